import { describe, expect, it } from 'vitest';
import { hasContractEnded } from './employment';

describe('hasContractEnded', () => {
	const zone = 'Asia/Ho_Chi_Minh'; // UTC+7, no daylight saving

	it('covers the whole last day in the plant zone', () => {
		// 2026-12-20 23:30 in the plant is 16:30 UTC the same day
		expect(hasContractEnded('2026-12-20', zone, new Date('2026-12-20T16:30:00Z'))).toBe(false);
	});

	it('has ended once the plant calendar reaches the next day', () => {
		// 2026-12-21 00:30 in the plant is still 2026-12-20 in UTC
		expect(hasContractEnded('2026-12-20', zone, new Date('2026-12-20T17:30:00Z'))).toBe(true);
	});

	it('never ends without an end date', () => {
		expect(hasContractEnded(null, zone, new Date('2099-01-01T00:00:00Z'))).toBe(false);
	});
});
