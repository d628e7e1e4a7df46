// The Readiness board's cell states, shared by the server, the page and the CSV export. Every
// state has a word and a glyph as well as a tone, so the board reads without colour and in print.

export const READINESS_STATES = [
	'certified',
	'expiring',
	'grace',
	'expired',
	'suspended',
	'in_training',
	'none'
] as const;
export type ReadinessState = (typeof READINESS_STATES)[number];

export const READINESS_LABELS: Record<ReadinessState, string> = {
	certified: 'Certified',
	expiring: 'Expiring',
	grace: 'Grace',
	expired: 'Expired',
	suspended: 'Suspended',
	in_training: 'In training',
	none: 'None'
};

/** A glyph per state that survives black-and-white printing and colour-blind eyes. */
export const READINESS_GLYPHS: Record<ReadinessState, string> = {
	certified: '✔',
	expiring: '◷',
	grace: '⚠',
	expired: '✖',
	suspended: '‖',
	in_training: '◐',
	none: '–'
};

export const READINESS_TONES: Record<
	ReadinessState,
	'valid' | 'denied' | 'info' | 'warn' | 'neutral'
> = {
	certified: 'valid',
	expiring: 'warn',
	grace: 'warn',
	expired: 'denied',
	suspended: 'denied',
	in_training: 'info',
	none: 'neutral'
};

export interface ReadinessCellText {
	state: ReadinessState;
	daysToExpiry: number | null;
	graceUntil: string | null;
}

/** The short text of a cell: "Expiring 12 d", "Grace to 2026-12-20". */
export function readinessCellText(c: ReadinessCellText, dateOf: (iso: string) => string): string {
	const label = READINESS_LABELS[c.state];
	if (c.state === 'expiring' && c.daysToExpiry != null) return `${label} ${c.daysToExpiry} d`;
	if (c.state === 'grace' && c.graceUntil) return `${label} to ${dateOf(c.graceUntil)}`;
	return label;
}
