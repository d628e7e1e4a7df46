export const EMPLOYMENT_TYPES = ['employee', 'agency', 'contractor'] as const;
export type EmploymentType = (typeof EMPLOYMENT_TYPES)[number];
