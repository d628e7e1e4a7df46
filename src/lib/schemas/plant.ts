import { z } from 'zod';
import { BOND_TYPES, CLOCK_TIME, STATION_CODE } from '../plant';

// Control characters and bidi overrides have no place in names printed on boards and certificates.
const NO_CONTROL = /^[^\p{Cc}\u202A-\u202E\u2066-\u2069]*$/u;

const code = (max: number, pattern: RegExp, message: string) =>
	z
		.string()
		.trim()
		.toUpperCase()
		.min(1, 'Code is required')
		.max(max, `At most ${max} characters`)
		.regex(pattern, message);

const name = (max: number) =>
	z
		.string()
		.trim()
		.min(1, 'Name is required')
		.max(max, `At most ${max} characters`)
		.regex(NO_CONTROL, 'The name contains control or direction-override characters');

const PLAIN_CODE = /^[A-Z0-9]+(-[A-Z0-9]+)*$/;
const PLAIN_CODE_MESSAGE = 'Letters, digits and single hyphens, e.g. L3 or FOG-MB';

export const lineSchema = z.object({
	// No hyphen: the line code is the first part of every station code on the line (L2-FOG-03).
	code: code(8, /^[A-Z0-9]+$/, 'Letters and digits only, e.g. L3'),
	name: name(200)
});
export type LineInput = z.infer<typeof lineSchema>;

// "7:00" is read as 07:00; what is stored is always HH:MM.
const clock = (label: string) =>
	z
		.string()
		.trim()
		.transform((v) => (/^\d:\d\d$/.test(v) ? `0${v}` : v))
		.pipe(z.string().regex(CLOCK_TIME, `${label}: a 24-hour time such as 06:00 or 22:30`));

export const shiftSchema = z
	.object({
		code: code(16, PLAIN_CODE, PLAIN_CODE_MESSAGE),
		name: name(100),
		startsAt: clock('Start'),
		endsAt: clock('End')
	})
	.refine((v) => v.startsAt !== v.endsAt, {
		path: ['endsAt'],
		message: 'The end must differ from the start (a night shift may end the next morning)'
	});
export type ShiftInput = z.infer<typeof shiftSchema>;

export const processSchema = z.object({
	code: code(32, PLAIN_CODE, PLAIN_CODE_MESSAGE),
	name: name(200),
	bondType: z.enum(BOND_TYPES, 'Choose the bond type')
});
export type ProcessInput = z.infer<typeof processSchema>;

export const stationSchema = z.object({
	code: code(32, STATION_CODE, 'Use line-kind-number, e.g. L2-FOG-03 or L1-INSP-01'),
	lineId: z.coerce.number('Choose the line').int().positive('Choose the line'),
	name: name(200),
	minQualified: z.coerce
		.number('A whole number')
		.int('A whole number')
		.min(0, 'At least 0')
		.max(50, 'At most 50')
		.default(2),
	processIds: z
		.array(z.coerce.number().int().positive())
		.min(1, 'Choose at least one process the station requires')
		.default([])
});
export type StationInput = z.infer<typeof stationSchema>;
