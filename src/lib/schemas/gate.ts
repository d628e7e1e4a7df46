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

const id = (message: string) => z.coerce.number(message).int(message).positive(message);

/** The grant form: who runs, where, under whom, until which wall-clock time (plant zone), why. */
export const grantSupervisedRunSchema = z.object({
	personId: id('Choose the person who will run the station.'),
	stationId: id('Choose the station.'),
	supervisorId: id('Choose the qualified supervisor who stays with them.'),
	until: z
		.string('Give the end time, e.g. 14:00.')
		.trim()
		.regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Give the end time as HH:MM, e.g. 14:00.'),
	reason: z
		.string('Say why the run is needed.')
		.trim()
		.min(5, 'Say why the run is needed (at least 5 characters).')
		.max(500, 'Keep the reason under 500 characters.')
});

export const revokeSupervisedRunSchema = z.object({
	runId: id('Choose the run to end.'),
	reason: z
		.string('Say why the run ends early.')
		.trim()
		.min(3, 'Say why the run ends early.')
		.max(500, 'Keep the reason under 500 characters.')
});

/** The kiosk's pairing form: a station gate API key, pasted by an admin. */
export const kioskPairSchema = z.object({
	key: z
		.string('Paste the station gate API key.')
		.trim()
		.min(1, 'Paste the station gate API key.')
		.max(200, 'That is too long for an API key.')
});

/** The kiosk's scan: the badge as the scanner typed it. */
export const kioskScanSchema = gateCheckSchema.pick({ badge: true });
