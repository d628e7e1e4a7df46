import { describe, expect, it } from 'vitest';
import { parseReminderDays, shortestMonthsDays } from './training';

/** The plain definition: every start month, every month summed. */
function bySumming(months: number): number {
	const lengths = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
	let best = Infinity;
	for (let start = 0; start < 12; start++) {
		let days = 0;
		for (let i = 0; i < months; i++) days += lengths[(start + i) % 12];
		best = Math.min(best, days);
	}
	return best;
}

describe('shortestMonthsDays', () => {
	it('equals the month-by-month sum for 0 to 120 months', () => {
		for (let m = 0; m <= 120; m++) expect(shortestMonthsDays(m), `${m}`).toBe(bySumming(m));
	});

	it('answers for numbers no form allows instead of counting to them', () => {
		expect(shortestMonthsDays(1e20)).toBeGreaterThanOrEqual(Math.floor(1e20 / 12) * 365);
		expect(Number.isFinite(shortestMonthsDays(1e20))).toBe(true);
		expect(shortestMonthsDays(Infinity)).toBe(Infinity);
		expect(shortestMonthsDays(Number.NaN)).toBe(Infinity);
		expect(parseReminderDays('30, 7', 1e20)).toEqual([30, 7]);
	});
});
