// Time helpers. Instants are stored in UTC; people see them in the plant's zone.

// Making an Intl.DateTimeFormat costs far more than using one; exports call localDate per cell.
const dateFormats = new Map<string, Intl.DateTimeFormat>();

/** The calendar date (YYYY-MM-DD) of an instant in a time zone. */
export function localDate(at: Date, timeZone: string): string {
	let format = dateFormats.get(timeZone);
	if (!format) {
		format = new Intl.DateTimeFormat('en-CA', {
			timeZone,
			year: 'numeric',
			month: '2-digit',
			day: '2-digit'
		});
		dateFormats.set(timeZone, format);
	}
	const parts = format.formatToParts(at);
	const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
	return `${get('year')}-${get('month')}-${get('day')}`;
}

/** "2026-12-01 14:05" in the given zone, with the zone's short name; seconds on request. */
export function formatLocal(
	at: Date | string | null | undefined,
	timeZone: string,
	withZone = true,
	withSeconds = false
): string {
	if (!at) return '—';
	const d = typeof at === 'string' ? new Date(at) : at;
	const parts = new Intl.DateTimeFormat('en-GB', {
		timeZone,
		year: 'numeric',
		month: '2-digit',
		day: '2-digit',
		hour: '2-digit',
		minute: '2-digit',
		second: withSeconds ? '2-digit' : undefined,
		hourCycle: 'h23',
		timeZoneName: withZone ? 'short' : undefined
	}).formatToParts(d);
	const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
	const base = `${get('year')}-${get('month')}-${get('day')} ${get('hour')}:${get('minute')}${withSeconds ? `:${get('second')}` : ''}`;
	return withZone ? `${base} ${get('timeZoneName')}` : base;
}

/**
 * The UTC instant of a wall-clock time in a zone, e.g. 06:00 on 2026-03-29 in Europe/Berlin.
 * Handles DST: a time that does not exist (skipped hour) moves forward by the gap.
 */
export function zonedToUtc(date: string, time: string, timeZone: string): Date {
	const [y, mo, d] = date.split('-').map(Number);
	const [h, mi, s = 0] = time.split(':').map(Number);
	const guess = Date.UTC(y, mo - 1, d, h, mi, s);
	const offsetAt = (t: number) => {
		const parts = new Intl.DateTimeFormat('en-US', {
			timeZone,
			hourCycle: 'h23',
			year: 'numeric',
			month: '2-digit',
			day: '2-digit',
			hour: '2-digit',
			minute: '2-digit',
			second: '2-digit'
		}).formatToParts(new Date(t));
		const get = (k: string) => Number(parts.find((p) => p.type === k)?.value);
		const asUtc = Date.UTC(
			get('year'),
			get('month') - 1,
			get('day'),
			get('hour'),
			get('minute'),
			get('second')
		);
		return asUtc - t;
	};
	let t = guess - offsetAt(guess);
	const off2 = offsetAt(t);
	if (guess - off2 !== t) t = guess - off2;
	return new Date(t);
}
