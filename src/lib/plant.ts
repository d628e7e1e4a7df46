// Plant vocabulary shared by the server, the forms and the pages (no server imports here).

/** The bond types a process belongs to (PRODUCT.md §1), plus inspection and general topics. */
export const BOND_TYPES = ['ACF', 'COG', 'FOG', 'FOB', 'COF', 'INSP', 'GEN'] as const;
export type BondType = (typeof BOND_TYPES)[number];

export const BOND_TYPE_LABELS: Record<BondType, string> = {
	ACF: 'ACF lamination',
	COG: 'Chip on glass',
	FOG: 'Flex on glass',
	FOB: 'Flex on board',
	COF: 'Chip on flex',
	INSP: 'Inspection',
	GEN: 'General (safety, ESD)'
};

/**
 * Station codes read line – kind – number, e.g. L2-FOG-03 or L2-INSP-01. The line part is not
 * fixed to "L<n>" so plants with other line codes (P3, LX, 12A) fit; the server checks that it
 * is the code of the station's line.
 */
export const STATION_CODE = /^[A-Z0-9]{1,8}-[A-Z]{2,10}-\d{2,3}$/;

/** The line part of a station code ("L2" of "L2-FOG-03"). */
export function stationCodeLine(code: string): string {
	return code.split('-')[0];
}

export const CLOCK_TIME = /^([01]\d|2[0-3]):[0-5]\d$/;

function minutesOfDay(hhmm: string): number {
	const [h, m] = hhmm.split(':').map(Number);
	return h * 60 + m;
}

/** Length of a shift in minutes; a shift whose end is not after its start runs past midnight. */
export function shiftLengthMinutes(startsAt: string, endsAt: string): number {
	const start = minutesOfDay(startsAt);
	const end = minutesOfDay(endsAt);
	return end > start ? end - start : end + 24 * 60 - start;
}

export function shiftCrossesMidnight(startsAt: string, endsAt: string): boolean {
	return minutesOfDay(endsAt) <= minutesOfDay(startsAt);
}

/** "8 h" or "7 h 30 min". */
export function formatMinutes(totalMin: number): string {
	const h = Math.floor(totalMin / 60);
	const m = totalMin % 60;
	return m ? `${h} h ${m} min` : `${h} h`;
}
