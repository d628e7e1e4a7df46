// The certificate register as people see it: a holder sees their own certificates; quality and
// admin see all of them, with the basis records, and suspend, reinstate or withdraw with a reason.
// Every status shown is derived from the stored state and the clock (deriveCertificateStatus).
import { and, asc, desc, eq, inArray, like, or, type SQL } from 'drizzle-orm';
import { db } from '../db';
import {
	certificateBasis,
	certificates,
	certificationRules,
	instructions,
	people,
	processes,
	revisions
} from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { queueSuspensionMail } from '../mail/events';
import { Refusal } from '../errors';
import { deriveCertificateStatus } from '../../training/status';
import type { CertificateState, CertificateStatus } from '../../training/vocabulary';
import { expiringWindowDays } from '../training/rules';
import type { Role } from '../../roles';

type Viewer = { id: number; roles: readonly Role[] };

/** Roles that see and manage every certificate. */
export const CERTIFICATE_MANAGER_ROLES: Role[] = ['quality', 'admin'];
export const managesCertificates = (v: Viewer) =>
	v.roles.some((r) => CERTIFICATE_MANAGER_ROLES.includes(r));

const notFound = () => new Refusal(404, 'No such certificate.');

const columns = {
	id: certificates.id,
	number: certificates.number,
	personId: certificates.personId,
	holderName: people.displayName,
	processId: certificates.processId,
	processCode: processes.code,
	processName: processes.name,
	state: certificates.state,
	issuedAt: certificates.issuedAt,
	expiresAt: certificates.expiresAt,
	graceUntil: certificates.graceUntil,
	previousId: certificates.previousId,
	reminderDays: certificationRules.reminderDays
};

function withStatus<
	T extends {
		state: CertificateState;
		expiresAt: Date;
		graceUntil: Date | null;
		reminderDays: number[];
	}
>(r: T, now: Date): Omit<T, 'reminderDays'> & { status: CertificateStatus } {
	const { reminderDays, ...rest } = r;
	return { ...rest, status: deriveCertificateStatus(r, now, expiringWindowDays({ reminderDays })) };
}

export interface CertificateFilter {
	q?: string;
	processId?: number;
	status?: CertificateStatus;
}

/** The viewer's own certificates, or (quality, admin) every certificate matching the filter. */
export async function listCertificates(
	viewer: Viewer,
	filter: CertificateFilter = {},
	now: Date = new Date()
) {
	const all = managesCertificates(viewer);
	const where: (SQL | undefined)[] = [];
	if (!all) where.push(eq(certificates.personId, viewer.id));
	if (all && filter.q) {
		const term = `%${filter.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
		where.push(
			or(
				like(certificates.number, term),
				like(people.displayName, term),
				like(people.employeeNo, term)
			)
		);
	}
	if (filter.processId) where.push(eq(certificates.processId, filter.processId));
	const rows = await db
		.select(columns)
		.from(certificates)
		.innerJoin(people, eq(people.id, certificates.personId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(and(...where))
		.orderBy(desc(certificates.issuedAt))
		.limit(all ? 500 : 200);
	const numbers = new Map(rows.map((r) => [r.id, r.number]));
	const successors = await successorsOf(rows.map((r) => r.id));
	const missing = rows
		.map((r) => r.previousId)
		.filter((id): id is number => !!id && !numbers.has(id));
	if (missing.length) {
		const prev = await db
			.select({ id: certificates.id, number: certificates.number })
			.from(certificates)
			.where(inArray(certificates.id, missing));
		for (const p of prev) numbers.set(p.id, p.number);
	}
	return rows
		.map((r) => withStatus(r, now))
		.filter((r) => !filter.status || r.status === filter.status)
		.map((r) => ({
			id: r.id,
			number: r.number,
			holderName: all ? r.holderName : null,
			processCode: r.processCode,
			processName: r.processName,
			status: r.status,
			issuedAt: r.issuedAt,
			expiresAt: r.expiresAt,
			previousNumber: r.previousId ? (numbers.get(r.previousId) ?? null) : null,
			supersededByNumber: successors.get(r.id)?.number ?? null
		}));
}

async function successorsOf(ids: number[]) {
	const out = new Map<number, { id: number; number: string }>();
	if (!ids.length) return out;
	const rows = await db
		.select({
			id: certificates.id,
			number: certificates.number,
			previousId: certificates.previousId
		})
		.from(certificates)
		.where(inArray(certificates.previousId, ids));
	for (const r of rows) if (r.previousId) out.set(r.previousId, { id: r.id, number: r.number });
	return out;
}

/** Processes for the register's filter. */
export async function listProcessChoices() {
	return db
		.select({ id: processes.id, code: processes.code, name: processes.name })
		.from(processes)
		.orderBy(asc(processes.code));
}

/** Holder or quality/admin; anyone else gets the same 404 as for a certificate that does not exist. */
async function visibleCertificate(viewer: Viewer, id: number) {
	const [c] = await db.select().from(certificates).where(eq(certificates.id, id));
	if (!c || (c.personId !== viewer.id && !managesCertificates(viewer))) throw notFound();
	return c;
}

/** One certificate with its basis records and its place in the renewal chain. */
export async function getCertificateForViewer(viewer: Viewer, id: number, now: Date = new Date()) {
	await visibleCertificate(viewer, id);
	const [row] = await db
		.select({
			...columns,
			employeeNo: people.employeeNo,
			ruleVersion: certificationRules.version,
			signerName: certificates.signerName,
			signerRole: certificates.signerRole,
			stateReason: certificates.stateReason,
			stateChangedAt: certificates.stateChangedAt,
			retrainingRevisionId: certificates.retrainingRevisionId,
			hasPdf: certificates.pdfKey
		})
		.from(certificates)
		.innerJoin(people, eq(people.id, certificates.personId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(eq(certificates.id, id));
	const basis = await db
		.select({
			kind: certificateBasis.kind,
			refId: certificateBasis.refId,
			docNumber: instructions.docNumber,
			letter: revisions.letter
		})
		.from(certificateBasis)
		.leftJoin(revisions, eq(revisions.id, certificateBasis.revisionId))
		.leftJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(eq(certificateBasis.certificateId, id))
		.orderBy(asc(certificateBasis.kind), asc(certificateBasis.refId));
	// The chain: walk back through previousId, and forward to whatever superseded this one.
	const chain: { id: number; number: string; issuedAt: Date; state: CertificateState }[] = [];
	let prevId = row.previousId;
	for (let guard = 0; prevId && guard < 50; guard++) {
		const [p] = await db
			.select({
				id: certificates.id,
				number: certificates.number,
				issuedAt: certificates.issuedAt,
				state: certificates.state,
				previousId: certificates.previousId
			})
			.from(certificates)
			.where(eq(certificates.id, prevId));
		if (!p) break;
		chain.unshift(p);
		prevId = p.previousId;
	}
	const next = (await successorsOf([id])).get(id) ?? null;
	const c = withStatus(row, now);
	const manager = managesCertificates(viewer);
	return {
		id: c.id,
		number: c.number,
		holderName: c.holderName,
		employeeNo: manager ? c.employeeNo : null,
		processCode: c.processCode,
		processName: c.processName,
		status: c.status,
		state: c.state,
		issuedAt: c.issuedAt,
		expiresAt: c.expiresAt,
		graceUntil: c.graceUntil,
		ruleVersion: c.ruleVersion,
		signerName: c.signerName,
		signerRole: c.signerRole,
		stateReason: c.stateReason,
		stateChangedAt: c.stateChangedAt,
		basis,
		previous: chain.map((p) => ({ id: p.id, number: p.number, issuedAt: p.issuedAt })),
		supersededBy: next,
		canManage: manager,
		isMine: c.personId === viewer.id
	};
}

/** The PDF's object key for someone who may see the certificate (holder, quality, admin). */
export async function certificatePdfFor(viewer: Viewer, id: number) {
	const c = await visibleCertificate(viewer, id);
	return { id: c.id, number: c.number, pdfKey: c.pdfKey };
}

export type StateAction = 'suspend' | 'reinstate' | 'withdraw';

const ACTION_WORDS: Record<StateAction, string> = {
	suspend: 'suspended',
	reinstate: 'reinstated',
	withdraw: 'withdrawn'
};

/**
 * Suspend (reversible), reinstate (back to active, or retraining due when a retraining revision
 * is recorded) and withdraw (final). The reason is required and kept with the certificate and in
 * the audit event, with the old and new state.
 */
export async function changeCertificateState(
	actor: Actor & { id: number },
	id: number,
	action: StateAction,
	reason: string,
	now: Date = new Date()
) {
	if (!reason.trim())
		throw new Refusal(400, 'Give the reason; it is kept in the audit trail.', {
			reason: 'Give the reason; it is kept in the audit trail.'
		});
	return db.transaction(async (tx) => {
		const [c] = await tx
			.select({
				state: certificates.state,
				expiresAt: certificates.expiresAt,
				graceUntil: certificates.graceUntil,
				retrainingRevisionId: certificates.retrainingRevisionId,
				reminderDays: certificationRules.reminderDays
			})
			.from(certificates)
			.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
			.where(eq(certificates.id, id))
			.for('update');
		if (!c) throw notFound();
		const status = deriveCertificateStatus(c, now, expiringWindowDays(c));
		let next: CertificateState;
		if (action === 'suspend') {
			if (c.state !== 'active' && c.state !== 'retraining_due')
				throw new Refusal(
					409,
					`A certificate that is ${status.replace('_', ' ')} cannot be suspended.`
				);
			if (status === 'expired')
				throw new Refusal(409, 'An expired certificate cannot be suspended.');
			next = 'suspended';
		} else if (action === 'reinstate') {
			if (c.state !== 'suspended')
				throw new Refusal(409, 'Only a suspended certificate can be reinstated.');
			next = c.retrainingRevisionId ? 'retraining_due' : 'active';
		} else {
			if (c.state === 'withdrawn' || c.state === 'superseded')
				throw new Refusal(409, `A ${c.state} certificate cannot be withdrawn.`);
			next = 'withdrawn';
		}
		await tx
			.update(certificates)
			.set({
				state: next,
				stateReason: reason,
				stateChangedAt: now,
				stateChangedBy: actor.id
			})
			.where(eq(certificates.id, id));
		await recordAudit(tx, actor, {
			action: `certificate.${ACTION_WORDS[action]}`,
			entityType: 'certificate',
			entityId: id,
			oldValues: { state: c.state },
			newValues: { state: next },
			reason
		});
		if (next === 'suspended') await queueSuspensionMail(tx, { certificateId: id, reason, at: now });
		return { from: c.state, to: next };
	});
}
