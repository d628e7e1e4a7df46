import { describe, expect, it } from 'vitest';
import { auditFilterSchema } from '../../schemas/audit';
import { auditFilterFrom, describeFilter } from './filter';

// Asia/Ho_Chi_Minh is UTC+7 all year (no daylight saving; IANA tz database, from memory);
// Europe/Berlin moves to UTC+2 on the last Sunday of March (EU summer time rule, from memory).
describe('auditFilterFrom', () => {
	it('reads from/to as whole days in the plant zone', () => {
		const input = auditFilterSchema.parse({ from: '2026-03-01', to: '2026-03-01' });
		const f = auditFilterFrom(input, 'Asia/Ho_Chi_Minh');
		expect(f.from?.toISOString()).toBe('2026-02-28T17:00:00.000Z');
		expect(f.before?.toISOString()).toBe('2026-03-01T17:00:00.000Z');
		expect(f.to).toBeUndefined();
	});

	it('ends a "to" day at the next local midnight across a DST change', () => {
		const f = auditFilterFrom(auditFilterSchema.parse({ to: '2026-03-28' }), 'Europe/Berlin');
		// 2026-03-29 00:00 in Berlin is still winter time (UTC+1): the switch is at 02:00.
		expect(f.before?.toISOString()).toBe('2026-03-28T23:00:00.000Z');
		const g = auditFilterFrom(auditFilterSchema.parse({ to: '2026-03-29' }), 'Europe/Berlin');
		expect(g.before?.toISOString()).toBe('2026-03-29T22:00:00.000Z');
	});

	it('maps the actor choice and leaves empty fields out', () => {
		expect(auditFilterFrom(auditFilterSchema.parse({ actor: '17' }), 'UTC')).toMatchObject({
			actorId: 17,
			systemActor: undefined,
			q: undefined
		});
		expect(auditFilterFrom(auditFilterSchema.parse({ actor: 'system' }), 'UTC').systemActor).toBe(
			true
		);
	});

	it('refuses an end before the start and a made-up actor', () => {
		const r = auditFilterSchema.safeParse({ from: '2026-05-02', to: '2026-05-01', actor: 'bob' });
		expect(r.success).toBe(false);
		expect(r.error!.issues.map((i) => i.path.join('.')).sort()).toEqual(['actor', 'to']);
	});

	it('describes only what was set, with the zone when dates were used', () => {
		const input = auditFilterSchema.parse({ q: 'L2-FOG-03', from: '2026-05-01', page: '3' });
		expect(describeFilter(input, 'Asia/Ho_Chi_Minh')).toEqual({
			q: 'L2-FOG-03',
			from: '2026-05-01',
			timeZone: 'Asia/Ho_Chi_Minh'
		});
		expect(describeFilter(auditFilterSchema.parse({ action: 'line.create' }), 'UTC')).toEqual({
			action: 'line.create'
		});
	});
});
