import { describe, expect, it } from 'vitest';
import { displayStatus, nextSwitchAfter, pickEffective, type TimedRevision } from './effective';

const rev = (
	id: number,
	iso: string | null,
	state: TimedRevision['state'] = 'approved'
): TimedRevision => ({
	id,
	state,
	effectiveFrom: iso ? new Date(iso) : null
});

describe('pickEffective', () => {
	const list = [
		rev(1, '2026-01-01T00:00:00Z'),
		rev(2, '2026-06-01T06:00:00Z'),
		rev(3, null, 'in_review')
	];

	it('takes the approved revision with the greatest effective instant not after now', () => {
		expect(pickEffective(list, new Date('2026-06-01T05:59:59Z'))?.id).toBe(1);
		expect(pickEffective(list, new Date('2026-06-01T06:00:00Z'))?.id).toBe(2);
		expect(pickEffective(list, new Date('2026-06-01T06:00:01Z'))?.id).toBe(2);
	});
	it('has nothing in force before the first instant or after withdrawal', () => {
		expect(pickEffective(list, new Date('2025-12-31T23:59:59Z'))).toBeNull();
		expect(pickEffective(list, new Date('2026-07-01Z'), new Date('2026-06-15Z'))).toBeNull();
		expect(pickEffective(list, new Date('2026-06-14Z'), new Date('2026-06-15Z'))?.id).toBe(2);
	});
	it('treats a persisted "superseded" state like approved, so a job cannot make reading wrong', () => {
		const withJob = [rev(1, '2026-01-01T00:00:00Z', 'superseded'), rev(2, '2026-06-01T06:00:00Z')];
		expect(pickEffective(withJob, new Date('2026-05-01Z'))?.id).toBe(1);
	});
	it('breaks a tie on the same instant in favour of the later revision', () => {
		expect(
			pickEffective([rev(5, '2026-01-01Z'), rev(4, '2026-01-01Z')], new Date('2026-02-01Z'))?.id
		).toBe(5);
	});
});

describe('displayStatus', () => {
	it('derives superseded, effective and scheduled from the clock', () => {
		const now = new Date('2026-03-01Z');
		expect(displayStatus(rev(1, '2026-01-01Z'), 2, now)).toBe('superseded');
		expect(displayStatus(rev(2, '2026-02-01Z'), 2, now)).toBe('effective');
		expect(displayStatus(rev(3, '2026-04-01Z'), 2, now)).toBe('scheduled');
		expect(displayStatus(rev(4, null, 'draft'), 2, now)).toBe('draft');
		expect(displayStatus(rev(5, null, 'in_review'), 2, now)).toBe('in_review');
	});
	it('finds the next switch instant', () => {
		expect(
			nextSwitchAfter(
				[rev(1, '2026-01-01Z'), rev(2, '2026-04-01Z')],
				new Date('2026-03-01Z')
			)?.toISOString()
		).toBe('2026-04-01T00:00:00.000Z');
	});
});
