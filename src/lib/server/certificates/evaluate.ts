// Certification rule evaluation: for people × processes, which requirements of the rule in force
// are met and which certificate each person holds. Batched (a handful of queries whatever the
// number of people), so a revision becoming effective can be re-evaluated for the whole plant.
import { and, eq, inArray, isNotNull, lte } from 'drizzle-orm';
import { db, type DbOrTx } from '../db';
import {
	acknowledgements,
	certificates,
	certificationRules,
	checkAttempts,
	checkVersions,
	instructions,
	knowledgeChecks,
	processes,
	revisions,
	ruleInstructions,
	signoffs,
	checklists
} from '../db/schema';
import { pickEffective } from '../instructions/effective';
import { deriveCertificateStatus } from '../../training/status';
import type { CertificateStatus } from '../../training/vocabulary';
import type { RevisionState } from '../../instructions/vocabulary';
import { expiringWindowDays, type RuleInForce } from '../training/rules';

export type RequirementKind = 'acknowledgement' | 'check' | 'signoff';

export interface Requirement {
	kind: RequirementKind;
	label: string;
	met: boolean;
	/** The record that meets it (acknowledgement, attempt or sign-off id). */
	refId?: number;
	/** The instruction revision it is about. */
	revisionId?: number;
	/** Where the person goes to do it, when it is theirs to do. */
	href?: string;
}

export interface HeldCertificate {
	id: number;
	number: string;
	status: CertificateStatus;
	issuedAt: Date;
	expiresAt: Date;
	graceUntil: Date | null;
}

export interface ProcessEvaluation {
	personId: number;
	processId: number;
	processCode: string;
	processName: string;
	ruleId: number | null;
	ruleVersion: number | null;
	requirements: Requirement[];
	/** Every requirement met with fresh evidence: a new certificate can be issued now. */
	met: boolean;
	/** The person's latest certificate for the process (any state), if any. */
	certificate: HeldCertificate | null;
}

interface EffectiveInstruction {
	instructionId: number;
	docNumber: string;
	title: string;
	effective: { id: number; letter: string; effectiveFrom: Date } | null;
	/** When the newest revision that needs retraining became effective (evidence must be newer). */
	retrainingFrom: Date | null;
}

const MONTH_MS = 30.4375 * 86_400_000;

/** Rules in force at `now` for the given processes (all processes when null). */
export async function rulesInForce(
	processIds: number[] | null,
	now: Date,
	conn: DbOrTx = db
): Promise<Map<number, RuleInForce>> {
	const rows = await conn
		.select()
		.from(certificationRules)
		.where(
			and(
				lte(certificationRules.activeFrom, now),
				processIds ? inArray(certificationRules.processId, processIds) : undefined
			)
		);
	const byProcess = new Map<number, RuleInForce>();
	for (const r of rows) {
		const cur = byProcess.get(r.processId);
		if (!cur || r.version > cur.version) byProcess.set(r.processId, { ...r, instructionIds: [] });
	}
	const ruleIds = [...byProcess.values()].map((r) => r.id);
	if (ruleIds.length) {
		const ins = await conn
			.select()
			.from(ruleInstructions)
			.where(inArray(ruleInstructions.ruleId, ruleIds));
		const byRule = new Map([...byProcess.values()].map((r) => [r.id, r]));
		for (const i of ins) byRule.get(i.ruleId)?.instructionIds.push(i.instructionId);
	}
	return byProcess;
}

/** The effective revision of each instruction at `now`, and its latest retraining instant. */
export async function effectiveInstructions(
	instructionIds: number[],
	now: Date,
	conn: DbOrTx = db
): Promise<Map<number, EffectiveInstruction>> {
	const out = new Map<number, EffectiveInstruction>();
	if (!instructionIds.length) return out;
	const ins = await conn
		.select({
			id: instructions.id,
			docNumber: instructions.docNumber,
			title: instructions.title,
			withdrawnAt: instructions.withdrawnAt
		})
		.from(instructions)
		.where(inArray(instructions.id, instructionIds));
	const revs = await conn
		.select({
			id: revisions.id,
			instructionId: revisions.instructionId,
			letter: revisions.letter,
			state: revisions.state,
			effectiveFrom: revisions.effectiveFrom,
			classification: revisions.classification
		})
		.from(revisions)
		.where(
			and(inArray(revisions.instructionId, instructionIds), isNotNull(revisions.effectiveFrom))
		);
	for (const i of ins) {
		const mine = revs.filter((r) => r.instructionId === i.id) as ((typeof revs)[number] & {
			state: RevisionState;
		})[];
		const eff = pickEffective(mine, now, i.withdrawnAt);
		let retrainingFrom: Date | null = null;
		for (const r of mine) {
			if (r.classification !== 'retraining' || !r.effectiveFrom) continue;
			if (r.state !== 'approved' && r.state !== 'superseded') continue;
			if (r.effectiveFrom.getTime() > now.getTime()) continue;
			if (!retrainingFrom || r.effectiveFrom > retrainingFrom) retrainingFrom = r.effectiveFrom;
		}
		out.set(i.id, {
			instructionId: i.id,
			docNumber: i.docNumber,
			title: i.title,
			effective: eff ? { id: eff.id, letter: eff.letter, effectiveFrom: eff.effectiveFrom! } : null,
			retrainingFrom
		});
	}
	return out;
}

/**
 * Evaluates the rule in force for each person × process. `processIds` null means every process
 * that has a rule in force.
 *
 * Evidence: an acknowledgement of each listed instruction's effective revision; a passed attempt
 * of the rule's knowledge check submitted after the person's latest certificate for the process
 * was issued and after the newest retraining revision became effective (so a renewal and a
 * retraining need a new check); a countersigned, passed practical sign-off on the rule's checklist
 * within the validity period.
 */
export async function evaluatePeople(
	personIds: number[],
	processIds: number[] | null,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<ProcessEvaluation[]> {
	if (!personIds.length) return [];
	const rules = await rulesInForce(processIds, now, conn);
	const procIds = processIds ?? [...rules.keys()];
	if (!procIds.length) return [];
	const procRows = await conn
		.select({ id: processes.id, code: processes.code, name: processes.name })
		.from(processes)
		.where(inArray(processes.id, procIds));
	const allInstructionIds = [...new Set([...rules.values()].flatMap((r) => r.instructionIds))];
	const effective = await effectiveInstructions(allInstructionIds, now, conn);
	const effectiveRevisionIds = [...effective.values()]
		.map((e) => e.effective?.id)
		.filter((x): x is number => x != null);

	const ackRows = effectiveRevisionIds.length
		? await conn
				.select({
					id: acknowledgements.id,
					personId: acknowledgements.personId,
					revisionId: acknowledgements.revisionId
				})
				.from(acknowledgements)
				.where(
					and(
						inArray(acknowledgements.personId, personIds),
						inArray(acknowledgements.revisionId, effectiveRevisionIds)
					)
				)
		: [];
	const acks = new Map(ackRows.map((a) => [`${a.personId}:${a.revisionId}`, a.id]));

	const checkIds = [...new Set([...rules.values()].map((r) => r.checkId).filter((x) => x != null))];
	const attemptRows = checkIds.length
		? await conn
				.select({
					id: checkAttempts.id,
					personId: checkAttempts.personId,
					checkId: checkVersions.checkId,
					submittedAt: checkAttempts.submittedAt
				})
				.from(checkAttempts)
				.innerJoin(checkVersions, eq(checkVersions.id, checkAttempts.checkVersionId))
				.where(
					and(
						inArray(checkAttempts.personId, personIds),
						inArray(checkVersions.checkId, checkIds as number[]),
						eq(checkAttempts.passed, true),
						isNotNull(checkAttempts.submittedAt)
					)
				)
		: [];
	const latestAttempt = new Map<string, { id: number; at: Date }>();
	for (const a of attemptRows) {
		const k = `${a.personId}:${a.checkId}`;
		const cur = latestAttempt.get(k);
		if (!cur || a.submittedAt! > cur.at) latestAttempt.set(k, { id: a.id, at: a.submittedAt! });
	}

	const checklistIds = [
		...new Set([...rules.values()].map((r) => r.checklistId).filter((x) => x != null))
	] as number[];
	const signoffRows = checklistIds.length
		? await conn
				.select({
					id: signoffs.id,
					personId: signoffs.personId,
					checklistId: signoffs.checklistId,
					revisionId: signoffs.revisionId,
					at: signoffs.operatorSignedAt
				})
				.from(signoffs)
				.where(
					and(
						inArray(signoffs.personId, personIds),
						inArray(signoffs.checklistId, checklistIds),
						eq(signoffs.state, 'countersigned'),
						eq(signoffs.passed, true)
					)
				)
		: [];
	const latestSignoff = new Map<string, { id: number; at: Date; revisionId: number }>();
	for (const s of signoffRows) {
		if (!s.at) continue;
		const k = `${s.personId}:${s.checklistId}`;
		const cur = latestSignoff.get(k);
		if (!cur || s.at > cur.at)
			latestSignoff.set(k, { id: s.id, at: s.at, revisionId: s.revisionId });
	}

	const certRows = await conn
		.select({
			id: certificates.id,
			number: certificates.number,
			personId: certificates.personId,
			processId: certificates.processId,
			ruleId: certificates.ruleId,
			state: certificates.state,
			issuedAt: certificates.issuedAt,
			expiresAt: certificates.expiresAt,
			graceUntil: certificates.graceUntil,
			reminderDays: certificationRules.reminderDays
		})
		.from(certificates)
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(
			and(inArray(certificates.personId, personIds), inArray(certificates.processId, procIds))
		);
	const latestCert = new Map<string, (typeof certRows)[number]>();
	for (const c of certRows) {
		const k = `${c.personId}:${c.processId}`;
		const cur = latestCert.get(k);
		if (
			!cur ||
			c.issuedAt > cur.issuedAt ||
			(c.issuedAt.getTime() === cur.issuedAt.getTime() && c.id > cur.id)
		)
			latestCert.set(k, c);
	}

	const checkNames = checkIds.length
		? new Map(
				(
					await conn
						.select({
							id: knowledgeChecks.id,
							code: knowledgeChecks.code,
							title: knowledgeChecks.title
						})
						.from(knowledgeChecks)
						.where(inArray(knowledgeChecks.id, checkIds as number[]))
				).map((c) => [c.id, c])
			)
		: new Map();
	const checklistNames = checklistIds.length
		? new Map(
				(
					await conn
						.select({ id: checklists.id, title: checklists.title })
						.from(checklists)
						.where(inArray(checklists.id, checklistIds))
				).map((c) => [c.id, c.title])
			)
		: new Map<number, string>();

	const out: ProcessEvaluation[] = [];
	for (const personId of personIds) {
		for (const proc of procRows) {
			const rule = rules.get(proc.id) ?? null;
			const held = latestCert.get(`${personId}:${proc.id}`) ?? null;
			const certificate: HeldCertificate | null = held
				? {
						id: held.id,
						number: held.number,
						status: deriveCertificateStatus(held, now, expiringWindowDays(held)),
						issuedAt: held.issuedAt,
						expiresAt: held.expiresAt,
						graceUntil: held.graceUntil
					}
				: null;
			const requirements: Requirement[] = [];
			if (rule) {
				let retrainingFrom: Date | null = null;
				for (const insId of rule.instructionIds) {
					const e = effective.get(insId);
					if (!e) continue;
					if (e.retrainingFrom && (!retrainingFrom || e.retrainingFrom > retrainingFrom))
						retrainingFrom = e.retrainingFrom;
					if (!e.effective) {
						requirements.push({
							kind: 'acknowledgement',
							label: `${e.docNumber} has no effective revision`,
							met: false
						});
						continue;
					}
					const ackId = acks.get(`${personId}:${e.effective.id}`);
					requirements.push({
						kind: 'acknowledgement',
						label: `Read and acknowledge ${e.docNumber} rev ${e.effective.letter} — ${e.title}`,
						met: ackId != null,
						refId: ackId,
						revisionId: e.effective.id,
						href: `/instructions/${e.docNumber}/acknowledge`
					});
				}
				if (rule.checkId != null) {
					const a = latestAttempt.get(`${personId}:${rule.checkId}`);
					const after = Math.max(held?.issuedAt.getTime() ?? 0, retrainingFrom?.getTime() ?? 0);
					const fresh = a && a.at.getTime() > after;
					const c = checkNames.get(rule.checkId);
					requirements.push({
						kind: 'check',
						label: `Pass the knowledge check ${c?.code ?? ''} (${rule.passMarkPct} %)`.trim(),
						met: !!fresh,
						refId: fresh ? a!.id : undefined,
						href: `/training/checks/${c?.code ?? ''}`
					});
				}
				if (rule.practicalRequired) {
					const s = rule.checklistId ? latestSignoff.get(`${personId}:${rule.checklistId}`) : null;
					const fresh = s && s.at.getTime() >= now.getTime() - rule.validityMonths * MONTH_MS;
					requirements.push({
						kind: 'signoff',
						label: rule.checklistId
							? `Practical sign-off at the bonder: ${checklistNames.get(rule.checklistId) ?? ''}`
							: 'Practical sign-off (no checklist set in the rule)',
						met: !!fresh,
						refId: fresh ? s!.id : undefined,
						revisionId: fresh ? s!.revisionId : undefined
					});
				}
			}
			out.push({
				personId,
				processId: proc.id,
				processCode: proc.code,
				processName: proc.name,
				ruleId: rule?.id ?? null,
				ruleVersion: rule?.version ?? null,
				requirements,
				met: !!rule && requirements.every((r) => r.met),
				certificate
			});
		}
	}
	return out;
}

/** One person × one process. */
export async function evaluatePerson(
	personId: number,
	processId: number,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<ProcessEvaluation | null> {
	const [e] = await evaluatePeople([personId], [processId], now, conn);
	return e ?? null;
}
