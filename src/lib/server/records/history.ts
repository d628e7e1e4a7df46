// One person's training history, as HR, auditors and the person themself read it: every
// assignment, acknowledgement, knowledge-check attempt, practical sign-off and certificate, with
// the revisions, scores, signers and times, and each certificate's state changes from the audit
// trail. The screen, the PDF and the JSON download are all made from this one read.
import { and, asc, eq, inArray, like, or, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import {
	acknowledgements,
	assignments,
	auditEvents,
	certificateBasis,
	certificates,
	certificationRules,
	checkAttempts,
	checklists,
	checkVersions,
	instructions,
	knowledgeChecks,
	lines,
	people,
	processes,
	revisions,
	shifts,
	signatures,
	signoffs,
	sites,
	stations
} from '../db/schema';
import { config } from '../config';
import { SIGNOFF_RECORD_TYPE } from '../training/signoffs/signoffs';
import { expiringWindowDays } from '../training/rules';
import { deriveCertificateStatus } from '../../training/status';
import type {
	AssignmentScope,
	AttemptState,
	BasisKind,
	CertificateState,
	CertificateStatus,
	SignoffState
} from '../../training/vocabulary';
import type { EmploymentType } from '../../employment';
import {
	CERTIFICATE_EVENT_KINDS,
	type CertificateEventKind
} from '../../records/history-vocabulary';

export interface HistoryPerson {
	id: number;
	employeeNo: string;
	displayName: string;
	email: string | null;
	badgeNo: string | null;
	employmentType: EmploymentType;
	agencyName: string | null;
	contractEndsOn: string | null;
	line: { code: string; name: string } | null;
	shift: { code: string; name: string } | null;
	active: boolean;
	employmentEndedOn: string | null;
	anonymisedAt: Date | null;
}

export interface HistoryAssignment {
	id: number;
	processCode: string;
	processName: string;
	scope: AssignmentScope;
	lineCode: string | null;
	stationCode: string | null;
	/** Plant date. */
	dueOn: string | null;
	assignedAt: Date;
	assignedBy: string;
	closedAt: Date | null;
	closedReason: string | null;
}

export interface HistoryAcknowledgement {
	id: number;
	docNumber: string;
	title: string;
	revision: string;
	acknowledgedAt: Date;
	/** How the person re-authenticated to sign it. */
	method: 'pin' | 'password';
	contentHash: string;
}

export interface HistoryAttempt {
	id: number;
	checkCode: string;
	checkTitle: string;
	checkVersion: number;
	processCode: string;
	state: AttemptState;
	startedAt: Date;
	submittedAt: Date | null;
	scorePct: number | null;
	passMarkPct: number;
	passed: boolean | null;
}

export interface HistorySigner {
	name: string;
	signedAt: Date | null;
}

export interface HistorySignoff {
	id: number;
	processCode: string;
	checklistTitle: string;
	docNumber: string;
	revision: string;
	stationCode: string | null;
	state: SignoffState;
	passed: boolean | null;
	createdAt: Date;
	/** The trainer who observed and signed (meaning "observed"). */
	trainer: HistorySigner;
	/** The operator's countersignature. */
	operator: HistorySigner;
}

export interface HistoryCertificateEvent {
	kind: CertificateEventKind;
	at: Date;
	by: string;
	reason: string | null;
}

export interface HistoryCertificate {
	id: number;
	number: string;
	processCode: string;
	processName: string;
	ruleVersion: number;
	issuedAt: Date;
	expiresAt: Date;
	graceUntil: Date | null;
	state: CertificateState;
	/** The state read against the clock at the history's `generatedAt`. */
	status: CertificateStatus;
	signerName: string;
	signerRole: string;
	previousNumber: string | null;
	basis: { kind: BasisKind; refId: number; docNumber: string | null; revision: string | null }[];
	events: HistoryCertificateEvent[];
}

export interface TrainingHistory {
	generatedAt: Date;
	timeZone: string;
	plant: { code: string | null; name: string };
	person: HistoryPerson;
	assignments: HistoryAssignment[];
	acknowledgements: HistoryAcknowledgement[];
	attempts: HistoryAttempt[];
	signoffs: HistorySignoff[];
	certificates: HistoryCertificate[];
}

const assigner = alias(people, 'assigner');
const trainer = alias(people, 'trainer');
const previous = alias(certificates, 'previous');

// Audit actions on a certificate, by the kind of event the history shows.
const CERTIFICATE_EVENTS = Object.fromEntries(
	CERTIFICATE_EVENT_KINDS.map((k) => [`certificate.${k}`, k])
) as Record<string, CertificateEventKind>;

/** The whole training history of one person, oldest first in every section; null if unknown. */
export async function trainingHistory(
	personId: number,
	now: Date = new Date()
): Promise<TrainingHistory | null> {
	const [p] = await db
		.select({
			id: people.id,
			employeeNo: people.employeeNo,
			displayName: people.displayName,
			email: people.email,
			badgeNo: people.badgeNo,
			employmentType: people.employmentType,
			agencyName: people.agencyName,
			contractEndsOn: people.contractEndsOn,
			lineCode: lines.code,
			lineName: lines.name,
			shiftCode: shifts.code,
			shiftName: shifts.name,
			active: people.active,
			employmentEndedOn: people.employmentEndedOn,
			anonymisedAt: people.anonymisedAt,
			siteCode: sites.code,
			siteName: sites.name,
			timeZone: sites.timeZone
		})
		.from(people)
		.leftJoin(sites, eq(sites.id, people.siteId))
		.leftJoin(lines, eq(lines.id, people.lineId))
		.leftJoin(shifts, eq(shifts.id, people.shiftId))
		.where(eq(people.id, personId));
	if (!p) return null;

	const [assignmentRows, ackRows, attemptRows, signoffRows, certRows] = await Promise.all([
		db
			.select({
				id: assignments.id,
				processCode: processes.code,
				processName: processes.name,
				scope: assignments.scope,
				lineCode: lines.code,
				stationCode: stations.code,
				dueOn: assignments.dueOn,
				assignedAt: assignments.assignedAt,
				assignedBy: assigner.displayName,
				closedAt: assignments.closedAt,
				closedReason: assignments.closedReason
			})
			.from(assignments)
			.innerJoin(processes, eq(processes.id, assignments.processId))
			.innerJoin(assigner, eq(assigner.id, assignments.assignedBy))
			.leftJoin(lines, eq(lines.id, assignments.lineId))
			.leftJoin(stations, eq(stations.id, assignments.stationId))
			.where(eq(assignments.personId, personId))
			.orderBy(asc(assignments.assignedAt), asc(assignments.id)),
		db
			.select({
				id: acknowledgements.id,
				docNumber: instructions.docNumber,
				title: instructions.title,
				revision: revisions.letter,
				acknowledgedAt: acknowledgements.acknowledgedAt,
				method: acknowledgements.method,
				contentHash: acknowledgements.contentHash
			})
			.from(acknowledgements)
			.innerJoin(revisions, eq(revisions.id, acknowledgements.revisionId))
			.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
			.where(eq(acknowledgements.personId, personId))
			.orderBy(asc(acknowledgements.acknowledgedAt), asc(acknowledgements.id)),
		db
			.select({
				id: checkAttempts.id,
				checkCode: knowledgeChecks.code,
				checkTitle: knowledgeChecks.title,
				checkVersion: checkVersions.version,
				processCode: processes.code,
				state: checkAttempts.state,
				startedAt: checkAttempts.startedAt,
				submittedAt: checkAttempts.submittedAt,
				scorePct: checkAttempts.scorePct,
				passMarkPct: checkAttempts.passMarkPct,
				passed: checkAttempts.passed
			})
			.from(checkAttempts)
			.innerJoin(checkVersions, eq(checkVersions.id, checkAttempts.checkVersionId))
			.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
			.innerJoin(processes, eq(processes.id, checkAttempts.processId))
			.where(eq(checkAttempts.personId, personId))
			.orderBy(asc(checkAttempts.startedAt), asc(checkAttempts.id)),
		db
			.select({
				id: signoffs.id,
				processCode: processes.code,
				checklistTitle: checklists.title,
				docNumber: instructions.docNumber,
				revision: revisions.letter,
				stationCode: stations.code,
				state: signoffs.state,
				passed: signoffs.passed,
				createdAt: signoffs.createdAt,
				trainerName: trainer.displayName,
				trainerSignedAt: signoffs.trainerSignedAt,
				operatorSignedAt: signoffs.operatorSignedAt
			})
			.from(signoffs)
			.innerJoin(processes, eq(processes.id, signoffs.processId))
			.innerJoin(checklists, eq(checklists.id, signoffs.checklistId))
			.innerJoin(revisions, eq(revisions.id, signoffs.revisionId))
			.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
			.innerJoin(trainer, eq(trainer.id, signoffs.trainerId))
			.leftJoin(stations, eq(stations.id, signoffs.stationId))
			.where(eq(signoffs.personId, personId))
			.orderBy(asc(signoffs.createdAt), asc(signoffs.id)),
		db
			.select({
				id: certificates.id,
				number: certificates.number,
				processCode: processes.code,
				processName: processes.name,
				ruleVersion: certificationRules.version,
				reminderDays: certificationRules.reminderDays,
				issuedAt: certificates.issuedAt,
				expiresAt: certificates.expiresAt,
				graceUntil: certificates.graceUntil,
				state: certificates.state,
				stateReason: certificates.stateReason,
				stateChangedAt: certificates.stateChangedAt,
				signerName: certificates.signerName,
				signerRole: certificates.signerRole,
				previousNumber: previous.number
			})
			.from(certificates)
			.innerJoin(processes, eq(processes.id, certificates.processId))
			.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
			.leftJoin(previous, eq(previous.id, certificates.previousId))
			.where(eq(certificates.personId, personId))
			.orderBy(asc(certificates.issuedAt), asc(certificates.id))
	]);

	const signoffIds = signoffRows.map((s) => s.id);
	const certIds = certRows.map((c) => c.id);
	const [sigRows, basisRows, eventRows] = await Promise.all([
		signoffIds.length
			? db
					.select({
						recordId: signatures.recordId,
						meaning: signatures.meaning,
						printedName: signatures.printedName,
						signedAt: signatures.signedAt
					})
					.from(signatures)
					.where(
						and(
							eq(signatures.recordType, SIGNOFF_RECORD_TYPE),
							inArray(signatures.recordId, signoffIds)
						)
					)
			: [],
		certIds.length
			? db
					.select({
						certificateId: certificateBasis.certificateId,
						kind: certificateBasis.kind,
						refId: certificateBasis.refId,
						docNumber: instructions.docNumber,
						revision: revisions.letter
					})
					.from(certificateBasis)
					.leftJoin(revisions, eq(revisions.id, certificateBasis.revisionId))
					.leftJoin(instructions, eq(instructions.id, revisions.instructionId))
					.where(inArray(certificateBasis.certificateId, certIds))
					.orderBy(asc(certificateBasis.kind), asc(certificateBasis.refId))
			: [],
		certIds.length
			? db
					.select({
						entityId: auditEvents.entityId,
						action: auditEvents.action,
						at: auditEvents.at,
						actorLabel: auditEvents.actorLabel,
						reason: auditEvents.reason
					})
					.from(auditEvents)
					.where(
						and(
							eq(auditEvents.entityType, 'certificate'),
							inArray(auditEvents.entityId, certIds.map(String)),
							inArray(auditEvents.action, Object.keys(CERTIFICATE_EVENTS))
						)
					)
					.orderBy(asc(auditEvents.seq))
			: []
	]);

	const signerOf = (id: number, meaning: 'observed' | 'countersigned') =>
		sigRows.find((s) => s.recordId === id && s.meaning === meaning);

	return {
		generatedAt: now,
		timeZone: p.timeZone ?? config.plantTimeZone,
		plant: { code: p.siteCode, name: p.siteName ?? config.plantName },
		person: {
			id: p.id,
			employeeNo: p.employeeNo,
			displayName: p.displayName,
			email: p.email,
			badgeNo: p.badgeNo,
			employmentType: p.employmentType,
			agencyName: p.agencyName,
			contractEndsOn: p.contractEndsOn,
			line: p.lineCode ? { code: p.lineCode, name: p.lineName! } : null,
			shift: p.shiftCode ? { code: p.shiftCode, name: p.shiftName! } : null,
			active: p.active,
			employmentEndedOn: p.employmentEndedOn,
			anonymisedAt: p.anonymisedAt
		},
		assignments: assignmentRows,
		acknowledgements: ackRows,
		attempts: attemptRows.map((a) => ({
			...a,
			scorePct: a.scorePct == null ? null : Number(a.scorePct)
		})),
		signoffs: signoffRows.map((s) => {
			// The manifestation signed at the time; the people row only when no signature row exists.
			const observed = signerOf(s.id, 'observed');
			const counter = signerOf(s.id, 'countersigned');
			return {
				id: s.id,
				processCode: s.processCode,
				checklistTitle: s.checklistTitle,
				docNumber: s.docNumber,
				revision: s.revision,
				stationCode: s.stationCode,
				state: s.state,
				passed: s.passed,
				createdAt: s.createdAt,
				trainer: {
					name: observed?.printedName ?? s.trainerName,
					signedAt: observed?.signedAt ?? s.trainerSignedAt
				},
				operator: {
					name: counter?.printedName ?? p.displayName,
					signedAt: counter?.signedAt ?? s.operatorSignedAt
				}
			};
		}),
		certificates: certRows.map((c) => {
			const events: HistoryCertificateEvent[] = eventRows
				.filter((e) => e.entityId === String(c.id))
				.map((e) => ({
					kind: CERTIFICATE_EVENTS[e.action],
					at: e.at,
					by: e.actorLabel,
					reason: e.reason
				}));
			// A state set outside the trail (an import) still shows once, from the certificate row.
			const current = c.state as string as CertificateEventKind;
			if (
				c.state !== 'active' &&
				c.stateChangedAt &&
				!events.some((e) => e.kind === current) &&
				(CERTIFICATE_EVENT_KINDS as readonly string[]).includes(current)
			) {
				events.push({ kind: current, at: c.stateChangedAt, by: '—', reason: c.stateReason });
			}
			return {
				id: c.id,
				number: c.number,
				processCode: c.processCode,
				processName: c.processName,
				ruleVersion: c.ruleVersion,
				issuedAt: c.issuedAt,
				expiresAt: c.expiresAt,
				graceUntil: c.graceUntil,
				state: c.state,
				status: deriveCertificateStatus(c, now, expiringWindowDays(c)),
				signerName: c.signerName,
				signerRole: c.signerRole,
				previousNumber: c.previousNumber,
				basis: basisRows
					.filter((b) => b.certificateId === c.id)
					.map((b) => ({
						kind: b.kind,
						refId: b.refId,
						docNumber: b.docNumber,
						revision: b.revision
					})),
				events
			};
		})
	};
}

export interface PeopleFilter {
	q?: string;
	lineId?: number;
	/** Default: everyone. */
	status?: 'active' | 'inactive';
}

/** People for the training-history list: name, employee number or badge matched, by name. */
export async function listRecordPeople(f: PeopleFilter, limit = 200) {
	const where: (SQL | undefined)[] = [];
	if (f.q) {
		const term = `%${f.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
		where.push(
			or(like(people.displayName, term), like(people.employeeNo, term), like(people.badgeNo, term))
		);
	}
	if (f.lineId) where.push(eq(people.lineId, f.lineId));
	if (f.status) where.push(eq(people.active, f.status === 'active'));
	const rows = await db
		.select({
			id: people.id,
			displayName: people.displayName,
			employeeNo: people.employeeNo,
			lineCode: lines.code,
			shiftCode: shifts.code,
			employmentType: people.employmentType,
			active: people.active
		})
		.from(people)
		.leftJoin(lines, eq(lines.id, people.lineId))
		.leftJoin(shifts, eq(shifts.id, people.shiftId))
		.where(and(...where))
		.orderBy(asc(people.displayName), asc(people.id))
		.limit(limit + 1);
	return { people: rows.slice(0, limit), more: rows.length > limit };
}

/** Lines for the list's filter. */
export function listRecordLines() {
	return db
		.select({ id: lines.id, code: lines.code, name: lines.name })
		.from(lines)
		.orderBy(asc(lines.code));
}
