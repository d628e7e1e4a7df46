import { zonedToUtc } from '../../time';
import type { AuditFilterInput } from '../../schemas/audit';
import type { AuditFilter } from './index';

function nextDay(date: string): string {
	const d = new Date(`${date}T00:00:00Z`);
	d.setUTCDate(d.getUTCDate() + 1);
	return d.toISOString().slice(0, 10);
}

/**
 * A period of whole plant days as UTC bounds: `from` is local midnight of the first day,
 * `before` (exclusive) local midnight after the last day. Empty dates leave that side open.
 */
export function plantPeriod(from: string, to: string, timeZone: string) {
	return {
		from: from ? zonedToUtc(from, '00:00', timeZone) : undefined,
		before: to ? zonedToUtc(nextDay(to), '00:00', timeZone) : undefined
	};
}

/**
 * The database filter for the form's values. Dates are whole days in the plant's zone: "from"
 * starts at local midnight, "to" includes the whole day (up to the next local midnight).
 */
export function auditFilterFrom(input: AuditFilterInput, timeZone: string): AuditFilter {
	return {
		q: input.q || undefined,
		action: input.action || undefined,
		entityType: input.entityType || undefined,
		entityId: input.entityId || undefined,
		actorId: /^\d+$/.test(input.actor) ? Number(input.actor) : undefined,
		systemActor: input.actor === 'system' || undefined,
		...plantPeriod(input.from, input.to, timeZone),
		page: input.page
	};
}

/** The filter as the audit event of an export records it: only what was set, plus the zone. */
export function describeFilter(
	input: { page?: number; from?: string; to?: string } & Record<string, unknown>,
	timeZone: string
) {
	const { page: _page, ...rest } = input;
	const set = Object.fromEntries(Object.entries(rest).filter(([, v]) => v !== ''));
	return set.from || set.to ? { ...set, timeZone } : set;
}
