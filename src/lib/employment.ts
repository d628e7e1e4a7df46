import { localDate } from './time';

export const EMPLOYMENT_TYPES = ['employee', 'agency', 'contractor'] as const;
export type EmploymentType = (typeof EMPLOYMENT_TYPES)[number];

/**
 * True once the plant's calendar has moved past the contract's last day (the contract covers its
 * whole end date in the plant's time zone). No end date means no end.
 */
export function hasContractEnded(
	contractEndsOn: string | null | undefined,
	timeZone: string,
	now: Date = new Date()
): boolean {
	return !!contractEndsOn && localDate(now, timeZone) > contractEndsOn;
}
