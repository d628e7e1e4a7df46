import { describe, expect, it } from 'vitest';
import { decideGate, type GateCertificate, type GateInput } from './decide';
import type { CertificateStatus } from '../training/vocabulary';

const now = new Date('2026-12-02T03:00:00Z'); // 10:00 in the plant (UTC+7)
const DAY = 86_400_000;
const station = {
	id: 7,
	code: 'L2-FOG-03',
	active: true,
	processes: [
		{ id: 1, code: 'FOG-PB', name: 'FOG pre-bond' },
		{ id: 2, code: 'FOG-MB', name: 'FOG main bond' }
	]
};
const person = {
	id: 22,
	displayName: 'Phan Văn Khải',
	employeeNo: 'E-10434',
	active: true,
	employmentType: 'employee',
	contractEndsOn: null
};
const cert = (
	processId: number,
	status: CertificateStatus,
	extra: Partial<GateCertificate> = {}
) => ({
	processId,
	number: `KBO2-${processId}-${status}`,
	status,
	expiresAt: new Date(now.getTime() + 100 * DAY),
	graceUntil: null,
	...extra
});
const input = (over: Partial<GateInput> = {}): GateInput => ({
	now,
	today: '2026-12-02',
	contractEndsAt: null,
	station,
	person,
	certificates: [cert(1, 'valid')],
	supervisedRun: null,
	...over
});

describe('gate matrix: certificate state of the second required process × decision', () => {
	// The station needs FOG-PB (held valid) and FOG-MB (the state under test).
	const cases: [CertificateStatus | 'none', 'allow' | 'deny', string | null, string | null][] = [
		['valid', 'allow', null, null],
		['expiring', 'allow', null, 'expiring'],
		['retraining_due', 'allow', null, 'retraining_due'],
		['retraining_overdue', 'deny', 'retraining_overdue', null],
		['expired', 'deny', 'expired', null],
		['suspended', 'deny', 'suspended', null],
		['withdrawn', 'deny', 'withdrawn', null],
		['superseded', 'deny', 'missing', null],
		['none', 'deny', 'missing', null]
	];
	for (const [status, decision, reason, warning] of cases) {
		it(`${status} → ${decision}${reason ? ` (${reason})` : ''}${warning ? ` with warning ${warning}` : ''}`, () => {
			const certificates = [cert(1, 'valid')];
			if (status !== 'none')
				certificates.push(
					cert(
						2,
						status,
						status === 'retraining_due' ? { graceUntil: new Date(now.getTime() + 5 * DAY) } : {}
					)
				);
			const d = decideGate(input({ certificates }));
			expect(d.decision).toBe(decision);
			expect(d.reasons.map((r) => `${r.code}:${r.process}`)).toEqual(
				reason ? [`${reason}:FOG-MB`] : []
			);
			expect(d.warnings.map((w) => `${w.code}:${w.process}`)).toEqual(
				warning ? [`${warning}:FOG-MB`] : []
			);
			if (decision === 'allow') expect(d.validUntil).not.toBeNull();
			else expect(d.validUntil).toBeNull();
		});
	}

	it('names every missing process, not only the first', () => {
		const d = decideGate(input({ certificates: [] }));
		expect(d.reasons.map((r) => r.process)).toEqual(['FOG-PB', 'FOG-MB']);
	});

	it('a renewal beside an old expired certificate allows', () => {
		const d = decideGate(
			input({ certificates: [cert(1, 'valid'), cert(2, 'expired'), cert(2, 'valid')] })
		);
		expect(d.decision).toBe('allow');
	});

	it('valid until the earliest of expiry and grace end', () => {
		const grace = new Date(now.getTime() + 3 * DAY);
		const d = decideGate(
			input({
				certificates: [cert(1, 'valid'), cert(2, 'retraining_due', { graceUntil: grace })]
			})
		);
		expect(d.validUntil).toEqual(grace);
	});
});

describe('gate: who and where', () => {
	it('unknown station', () => {
		expect(decideGate(input({ station: null })).reasons[0].code).toBe('unknown_station');
	});
	it('inactive station', () => {
		expect(decideGate(input({ station: { ...station, active: false } })).reasons[0].code).toBe(
			'station_inactive'
		);
	});
	it('unknown badge', () => {
		expect(decideGate(input({ person: null })).reasons[0].code).toBe('unknown_badge');
	});
	it('inactive person, even with valid certificates', () => {
		const d = decideGate(
			input({
				person: { ...person, active: false },
				certificates: [cert(1, 'valid'), cert(2, 'valid')]
			})
		);
		expect(d).toMatchObject({ decision: 'deny', reasons: [{ code: 'inactive_person' }] });
	});
	it('agency contract ended at the end of its last day (plant time), not before', () => {
		const endsAt = new Date('2026-12-02T17:00:00Z'); // 2026-12-03 00:00 at UTC+7
		const agency = { ...person, employmentType: 'agency', contractEndsOn: '2026-12-02' };
		const certificates = [cert(1, 'valid'), cert(2, 'valid')];
		const before = decideGate(
			input({
				person: agency,
				certificates,
				contractEndsAt: endsAt,
				now: new Date(endsAt.getTime() - 1)
			})
		);
		expect(before.decision).toBe('allow');
		expect(before.warnings.map((w) => w.code)).toContain('contract_ending');
		expect(before.validUntil).toEqual(endsAt);
		const at = decideGate(
			input({ person: agency, certificates, contractEndsAt: endsAt, now: endsAt })
		);
		expect(at).toMatchObject({ decision: 'deny', reasons: [{ code: 'contract_ended' }] });
	});
});

describe('gate: supervised runs', () => {
	const run = {
		id: 1,
		endsAt: new Date(now.getTime() + 4 * 3_600_000),
		supervisorName: 'Arjun Mehta'
	};
	it('allows with reason supervised, keeping what is missing, until the run ends', () => {
		const d = decideGate(input({ supervisedRun: run }));
		expect(d.decision).toBe('allow');
		expect(d.reasons.map((r) => r.code)).toEqual(['supervised', 'missing']);
		expect(d.validUntil).toEqual(run.endsAt);
	});
	it('a run that has ended does nothing', () => {
		const d = decideGate(input({ supervisedRun: run, now: run.endsAt }));
		expect(d.decision).toBe('deny');
	});
	it('a run never overrides an unknown badge or an ended contract', () => {
		expect(decideGate(input({ supervisedRun: run, person: null })).decision).toBe('deny');
	});
});
