import { describe, expect, it } from 'vitest';
import { STATION_CODE, shiftCrossesMidnight, shiftLengthMinutes, stationCodeLine } from './plant';
import { shiftSchema, stationSchema } from './schemas/plant';

// Shift arithmetic: plain clock arithmetic on a 24-hour day (common practice, no source).
describe('shifts', () => {
	it('measures day shifts and shifts that run past midnight', () => {
		expect(shiftLengthMinutes('06:00', '14:00')).toBe(480);
		expect(shiftLengthMinutes('22:00', '06:00')).toBe(480);
		expect(shiftLengthMinutes('18:30', '07:00')).toBe(750);
		expect(shiftCrossesMidnight('22:00', '06:00')).toBe(true);
		expect(shiftCrossesMidnight('14:00', '22:00')).toBe(false);
		expect(shiftCrossesMidnight('00:00', '08:00')).toBe(false);
	});
});

describe('station codes', () => {
	it('take line-kind-number with line codes beyond L<n>', () => {
		for (const ok of ['L2-FOG-03', 'L1-INSP-01', 'P3-COG-120', 'LX-FOB-07', '12A-COF-01'])
			expect(STATION_CODE.test(ok), ok).toBe(true);
		for (const bad of ['L2-FOG-3', 'L2_FOG_03', 'L2-FOG', 'L2-F0G-03', 'l2-fog-03', 'L2-FOG-03-A'])
			expect(STATION_CODE.test(bad), bad).toBe(false);
		expect(stationCodeLine('P3-COG-120')).toBe('P3');
	});

	it('are upper-cased and trimmed before the check', () => {
		const r = stationSchema.safeParse({
			code: ' l2-fog-07 ',
			lineId: 2,
			name: 'FOG bonder',
			processIds: [1, 2]
		});
		expect(r.success && r.data.code).toBe('L2-FOG-07');
	});

	it('need a line, a name and at least one process', () => {
		const r = stationSchema.safeParse({ code: 'L2-FOG-07', lineId: 0, name: ' ', processIds: [] });
		expect(r.success).toBe(false);
		const fields = r.error!.issues.map((i) => i.path.join('.'));
		expect(fields).toEqual(expect.arrayContaining(['lineId', 'name', 'processIds']));
	});
});

describe('shift times', () => {
	it('take H:MM and HH:MM on the 24-hour clock and store HH:MM', () => {
		const ok = shiftSchema.safeParse({
			code: 'w',
			name: 'Weekend',
			startsAt: '7:00',
			endsAt: '19:00'
		});
		expect(ok.success && [ok.data.code, ok.data.startsAt, ok.data.endsAt]).toEqual([
			'W',
			'07:00',
			'19:00'
		]);
		for (const bad of ['24:00', '7 pm', '07:60', '0700']) {
			const r = shiftSchema.safeParse({ code: 'W', name: 'x', startsAt: bad, endsAt: '19:00' });
			expect(r.success, bad).toBe(false);
		}
		const same = shiftSchema.safeParse({ code: 'W', name: 'x', startsAt: '06:00', endsAt: '6:00' });
		expect(same.success).toBe(false);
	});
});
