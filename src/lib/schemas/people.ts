import { z } from 'zod';
import { ROLES } from '../roles';
import { EMPLOYMENT_TYPES } from '../employment';

// Control characters and bidi overrides have no place in names shown on certificates.
const NO_CONTROL = /^[^\p{Cc}\u202A-\u202E\u2066-\u2069]*$/u;

const optionalText = (max: number) =>
	z
		.string()
		.trim()
		.max(max, `At most ${max} characters`)
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.default(null);

export const LOCALES = ['en', 'vi', 'zh', 'ko', 'ja', 'pl', 'es', 'hi'] as const;

export const personSchema = z
	.object({
		employeeNo: z
			.string()
			.trim()
			.min(1, 'Employee number is required')
			.max(32, 'At most 32 characters')
			.regex(/^[A-Za-z0-9-]+$/, 'Letters, digits and hyphens only'),
		displayName: z
			.string()
			.trim()
			.min(1, 'Name is required')
			.max(200, 'At most 200 characters')
			.regex(NO_CONTROL, 'The name contains control or direction-override characters'),
		email: z
			.union([z.literal(''), z.email('Not an e-mail address').max(254)])
			.transform((v) => (v === '' ? null : v.toLowerCase()))
			.nullable()
			.default(null),
		badgeNo: optionalText(64).refine((v) => v === null || /^[A-Za-z0-9-]{3,64}$/.test(v), {
			message: '3–64 letters, digits or hyphens'
		}),
		locale: z.enum(LOCALES).default('en'),
		employmentType: z.enum(EMPLOYMENT_TYPES).default('employee'),
		agencyName: optionalText(200),
		contractEndsOn: z
			.union([z.literal(''), z.iso.date('Use a real date (YYYY-MM-DD)')])
			.transform((v) => (v === '' ? null : v))
			.nullable()
			.default(null),
		lineId: z.coerce.number().int().positive().nullable().default(null),
		shiftId: z.coerce.number().int().positive().nullable().default(null),
		roles: z.array(z.enum(ROLES)).min(1, 'Choose at least one role').default(['operator'])
	})
	.superRefine((v, ctx) => {
		if (v.employmentType === 'agency' && !v.contractEndsOn) {
			ctx.addIssue({
				code: 'custom',
				path: ['contractEndsOn'],
				message: 'Agency staff need a contract end date'
			});
		}
		if (v.employmentType === 'agency' && !v.agencyName) {
			ctx.addIssue({ code: 'custom', path: ['agencyName'], message: 'Name the agency' });
		}
		if (!v.email && !v.badgeNo) {
			ctx.addIssue({
				code: 'custom',
				path: ['badgeNo'],
				message: 'Give an e-mail address or a badge number, so the person can sign in'
			});
		}
	});

export type PersonInput = z.infer<typeof personSchema>;

/** NIST SP 800-63B: at least 15 characters for a password used alone; long passphrases allowed. */
export const passwordSchema = z
	.string()
	.min(15, 'At least 15 characters (a phrase of a few words works well)')
	.max(128, 'At most 128 characters');

export const pinSchema = z.string().regex(/^\d{6,8}$/, 'A PIN is 6 to 8 digits');

export const resetSecretSchema = z
	.object({
		kind: z.enum(['password', 'pin']),
		secret: z.string().min(1, 'Enter the new password or PIN'),
		reason: z.string().trim().min(3, 'Say why (at least 3 characters)').max(500)
	})
	.superRefine((v, ctx) => {
		const r = (v.kind === 'password' ? passwordSchema : pinSchema).safeParse(v.secret);
		if (!r.success)
			ctx.addIssue({ code: 'custom', path: ['secret'], message: r.error.issues[0].message });
	});

export const deactivateSchema = z.object({
	reason: z.string().trim().min(3, 'Say why (at least 3 characters)').max(500)
});

export const passwordSignInSchema = z.object({
	email: z.email('Enter your e-mail address').max(254),
	password: z.string().min(1, 'Enter your password').max(256),
	redirectTo: z.string().max(500).default('/')
});

export const badgeSignInSchema = z.object({
	badge: z
		.string()
		.trim()
		.min(1, 'Scan or type your badge number')
		.max(64)
		.regex(/^[A-Za-z0-9-]+$/, 'Letters, digits and hyphens only'),
	pin: z.string().regex(/^\d{4,8}$/, 'Your PIN is 4 to 8 digits'),
	redirectTo: z.string().max(500).default('/')
});

/** Rehiring a person who left: why, and optionally the new contract's last day. */
export const rehireSchema = z.object({
	reason: z.string().trim().min(3, 'Say why (at least 3 characters)').max(500),
	contractEndsOn: z
		.union([z.literal(''), z.iso.date('Use a real date (YYYY-MM-DD)')])
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.default(null)
});
export type RehireInput = z.infer<typeof rehireSchema>;
