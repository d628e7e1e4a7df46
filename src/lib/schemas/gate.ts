import { z } from 'zod';

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f]/;

/** A gate check as stations send it; badge as the scanner read it. */
export const gateCheckSchema = z.object({
	station: z
		.string('Give the station code, e.g. "L2-FOG-03".')
		.trim()
		.min(1, 'Give the station code, e.g. "L2-FOG-03".')
		.max(64, 'A station code has at most 64 characters.')
		.refine((s) => !CONTROL.test(s), 'The station code contains control characters.'),
	badge: z
		.string('Give the badge number as scanned.')
		.trim()
		.min(1, 'Give the badge number as scanned.')
		.max(64, 'A badge number has at most 64 characters.')
		.refine((s) => !CONTROL.test(s), 'The badge number contains control characters.')
});
