// The station gate's decision, pure: given what the database says about the station, the person,
// their certificates and any supervised run, at one instant. Every reason is named so the station
// can show it; anything short of a clean "allow" is a deny.
import type { CertificateStatus } from '../training/vocabulary';

/** Every reason a decision can carry; the API docs and the OpenAPI file list each of them. */
export const GATE_REASON_CODES = [
	'unavailable',
	'unknown_station',
	'station_inactive',
	'unknown_badge',
	'inactive_person',
	'contract_ended',
	'missing',
	'expired',
	'suspended',
	'withdrawn',
	'retraining_overdue',
	'supervised'
] as const;
export type GateReasonCode = (typeof GATE_REASON_CODES)[number];

export const GATE_WARNING_CODES = ['expiring', 'retraining_due', 'contract_ending'] as const;
export type GateWarningCode = (typeof GATE_WARNING_CODES)[number];

export interface GateReason {
	code: GateReasonCode;
	process?: string;
	detail?: string;
}

export interface GateWarning {
	code: GateWarningCode;
	process?: string;
	detail?: string;
	until?: string;
}

export interface GateStation {
	id: number;
	code: string;
	active: boolean;
	processes: { id: number; code: string; name: string }[];
}

export interface GatePerson {
	id: number;
	displayName: string;
	employeeNo: string;
	active: boolean;
	employmentType: string;
	/** Last working day (plant date), or null. */
	contractEndsOn: string | null;
}

export interface GateCertificate {
	processId: number;
	number: string;
	status: CertificateStatus;
	expiresAt: Date;
	graceUntil: Date | null;
}

export interface GateSupervisedRun {
	id: number;
	endsAt: Date;
	supervisorName: string;
}

export interface GateInput {
	now: Date;
	/** The plant date at `now` (YYYY-MM-DD in the site's zone). */
	today: string;
	/** The instant the plant day `contractEndsOn` ends, when the person has a contract end. */
	contractEndsAt: Date | null;
	station: GateStation | null;
	person: GatePerson | null;
	/** All certificates of the person for the station's processes (any state). */
	certificates: GateCertificate[];
	supervisedRun: GateSupervisedRun | null;
}

export interface GateDecision {
	decision: 'allow' | 'deny';
	reasons: GateReason[];
	warnings: GateWarning[];
	/** Until when an allow holds (earliest expiry, grace end, run end, contract end). */
	validUntil: Date | null;
}

const QUALIFYING: CertificateStatus[] = ['valid', 'expiring', 'retraining_due'];
/** Which non-qualifying status explains a deny best, when a person has several certificates. */
const DENY_ORDER = ['suspended', 'withdrawn', 'retraining_overdue', 'expired'] as const;

const deny = (reasons: GateReason[], warnings: GateWarning[] = []): GateDecision => ({
	decision: 'deny',
	reasons,
	warnings,
	validUntil: null
});

export function decideGate(input: GateInput): GateDecision {
	const { station, person, now } = input;
	if (!station) return deny([{ code: 'unknown_station' }]);
	if (!station.active) return deny([{ code: 'station_inactive', detail: station.code }]);
	if (!person) return deny([{ code: 'unknown_badge' }]);
	if (!person.active) return deny([{ code: 'inactive_person' }]);
	if (input.contractEndsAt && now.getTime() >= input.contractEndsAt.getTime())
		return deny([{ code: 'contract_ended', detail: person.contractEndsOn ?? undefined }]);

	const reasons: GateReason[] = [];
	const warnings: GateWarning[] = [];
	let validUntil: number | null = input.contractEndsAt?.getTime() ?? null;
	const limit = (t: number | null | undefined) => {
		if (t != null && (validUntil == null || t < validUntil)) validUntil = t;
	};

	for (const p of station.processes) {
		const mine = input.certificates.filter((c) => c.processId === p.id);
		const good = mine
			.filter((c) => QUALIFYING.includes(c.status))
			.sort((a, b) => b.expiresAt.getTime() - a.expiresAt.getTime())[0];
		if (good) {
			limit(good.expiresAt.getTime());
			if (good.status === 'expiring')
				warnings.push({
					code: 'expiring',
					process: p.code,
					until: good.expiresAt.toISOString(),
					detail: good.number
				});
			if (good.status === 'retraining_due') {
				limit(good.graceUntil?.getTime());
				warnings.push({
					code: 'retraining_due',
					process: p.code,
					until: good.graceUntil?.toISOString(),
					detail: good.number
				});
			}
			continue;
		}
		const worst = DENY_ORDER.find((s) => mine.some((c) => c.status === s));
		if (!worst) reasons.push({ code: 'missing', process: p.code });
		else reasons.push({ code: worst, process: p.code });
	}
	if (input.contractEndsAt && person.contractEndsOn === input.today)
		warnings.push({ code: 'contract_ending', until: input.contractEndsAt.toISOString() });

	if (reasons.length) {
		// A supervised run stands in for the missing qualification until it ends.
		const run = input.supervisedRun;
		if (run && run.endsAt.getTime() > now.getTime()) {
			limit(run.endsAt.getTime());
			return {
				decision: 'allow',
				reasons: [
					{
						code: 'supervised',
						detail: `supervised by ${run.supervisorName} until ${run.endsAt.toISOString()}`
					},
					...reasons
				],
				warnings,
				validUntil: validUntil == null ? null : new Date(validUntil)
			};
		}
		return deny(reasons, warnings);
	}
	return {
		decision: 'allow',
		reasons: [],
		warnings,
		validUntil: validUntil == null ? null : new Date(validUntil)
	};
}
