// One function per event that mails someone. Each runs inside the transaction of the event itself
// (so the message exists exactly when the event does) and uses a dedupe key naming the event, so
// running the same step twice queues nothing more.
import { and, eq, isNotNull, ne } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import type { Tx } from '../db';
import {
	assignments,
	certificates,
	people,
	processes,
	roleAssignments,
	stations,
	supervisedRuns
} from '../db/schema';
import { siteZoneOf } from '../certificates/issue';
import { formatLocal, localDate } from '../../time';
import { CHANGE_CLASS_LABELS, type ChangeClass } from '../../instructions/vocabulary';
import { queueMail, type QueueMailResult } from './outbox';
import type { Audience } from './templates';

const your = (a: Audience) => (a.kind === 'self' ? 'your' : 'their');
const Your = (a: Audience) => (a.kind === 'self' ? 'Your' : 'Their');
const you = (a: Audience) => (a.kind === 'self' ? 'you' : 'they');

/** The last valid calendar day of a certificate (it expires at 00:00 of the next day). */
function validThrough(expiresAt: Date, zone: string) {
	return localDate(new Date(expiresAt.getTime() - 1), zone);
}

/** Review requested: every active quality approver with an address, except the author. */
export async function queueReviewRequestedMail(
	tx: Tx,
	r: {
		revisionId: number;
		/** The revision's version after submission: a resubmission is a new request. */
		version: number;
		docNumber: string;
		letter: string;
		title: string;
		authorId: number;
		authorName: string;
		changeSummary: string;
		classification: ChangeClass;
		now?: Date;
	}
): Promise<number> {
	const approvers = await tx
		.select({ id: people.id })
		.from(people)
		.innerJoin(
			roleAssignments,
			and(eq(roleAssignments.personId, people.id), eq(roleAssignments.role, 'quality'))
		)
		.where(and(eq(people.active, true), isNotNull(people.email), ne(people.id, r.authorId)));
	let queued = 0;
	for (const a of approvers) {
		const res = await queueMail(tx, {
			kind: 'review_requested',
			dedupeKey: `review_requested:revision:${r.revisionId}:v${r.version}:to:${a.id}`,
			toPersonId: a.id,
			now: r.now,
			notice: () => ({
				subject: `Review requested: ${r.docNumber} rev ${r.letter}`,
				summary: `${r.authorName} submitted revision ${r.letter} of ${r.docNumber} "${r.title}" for review.`,
				todo: 'Compare it with the revision in force, then approve it with your signature or send it back with a comment.',
				details: [
					['Change', r.changeSummary],
					['Classification', CHANGE_CLASS_LABELS[r.classification]]
				],
				action: {
					label: 'Open the review',
					path: `/instructions/${r.docNumber}/revisions/${r.letter}/review`
				}
			})
		});
		queued += res.queued;
	}
	return queued;
}

/** A revision that needs retraining became effective: the holder of an affected certificate. */
export async function queueRetrainingMail(
	tx: Tx,
	c: {
		certificateId: number;
		revisionId: number;
		docNumber: string;
		letter: string;
		graceUntil: Date;
		now?: Date;
	}
): Promise<QueueMailResult> {
	const [cert] = await tx
		.select({
			personId: certificates.personId,
			number: certificates.number,
			processCode: processes.code,
			processName: processes.name
		})
		.from(certificates)
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.where(eq(certificates.id, c.certificateId));
	const zone = await siteZoneOf(cert.personId, tx);
	return queueMail(tx, {
		kind: 'retraining_needed',
		dedupeKey: `retraining_needed:certificate:${c.certificateId}:revision:${c.revisionId}`,
		toPersonId: cert.personId,
		now: c.now,
		notice: (a) => ({
			subject: `Retraining needed: ${c.docNumber} rev ${c.letter} (${cert.processCode})`,
			summary: `Revision ${c.letter} of ${c.docNumber} is now in force and needs retraining. ${Your(a)} ${cert.processCode} certificate stays usable during the grace period only.`,
			todo: `Read revision ${c.letter} and acknowledge it, then complete what the certification rule asks, before the grace period ends. After that the station gate denies ${cert.processCode} until ${you(a)} are retrained.`,
			details: [
				['Process', `${cert.processCode} · ${cert.processName}`],
				['Certificate', cert.number],
				['Grace period ends', formatLocal(c.graceUntil, zone)]
			],
			action: {
				label: `Read ${c.docNumber} rev ${c.letter}`,
				path: `/instructions/${c.docNumber}/acknowledge`
			}
		})
	});
}

/** Certificate expiring within `days` (a reminder offset of its rule). */
export async function queueExpiringMail(
	tx: Tx,
	c: {
		certificateId: number;
		personId: number;
		number: string;
		processCode: string;
		processName: string;
		expiresAt: Date;
		days: number;
		now?: Date;
	}
): Promise<QueueMailResult> {
	const zone = await siteZoneOf(c.personId, tx);
	const through = validThrough(c.expiresAt, zone);
	return queueMail(tx, {
		kind: c.days <= 7 ? 'expiring_7' : 'expiring_30',
		dedupeKey: `expiring_${c.days}:certificate:${c.certificateId}`,
		toPersonId: c.personId,
		now: c.now,
		notice: (a) => ({
			subject: `${c.processCode} certificate expires in ${c.days} days (valid through ${through})`,
			summary: `${Your(a)} certificate ${c.number} for ${c.processCode} · ${c.processName} is valid through ${through}.`,
			todo: `Renew it before then: ask ${a.kind === 'self' ? 'your' : 'the'} trainer what the certification rule needs now (acknowledgement, knowledge check, practical sign-off). From ${formatLocal(c.expiresAt, zone)} the station gate denies ${c.processCode}.`,
			details: [
				['Certificate', c.number],
				['Process', `${c.processCode} · ${c.processName}`],
				['Valid through', through]
			],
			action: { label: 'See what to do next', path: '/' }
		})
	});
}

/** A process was assigned to a person (call once per assignment row, in its transaction). */
export async function queueAssignmentMail(
	tx: Tx,
	a0: { assignmentId: number; now?: Date }
): Promise<QueueMailResult> {
	const assigner = alias(people, 'assigner');
	const [row] = await tx
		.select({
			personId: assignments.personId,
			dueOn: assignments.dueOn,
			processCode: processes.code,
			processName: processes.name,
			assignedBy: assigner.displayName
		})
		.from(assignments)
		.innerJoin(processes, eq(processes.id, assignments.processId))
		.innerJoin(assigner, eq(assigner.id, assignments.assignedBy))
		.where(eq(assignments.id, a0.assignmentId));
	if (!row) return { queued: 0, route: 'inactive', reason: 'no such assignment' };
	return queueMail(tx, {
		kind: 'assignment',
		dedupeKey: `assignment:assignment:${a0.assignmentId}`,
		toPersonId: row.personId,
		now: a0.now,
		notice: (a) => ({
			subject: `Training assigned: ${row.processCode}${row.dueOn ? ` (due ${row.dueOn})` : ''}`,
			summary: `${row.assignedBy} assigned ${a.kind === 'self' ? 'you' : 'them'} to qualify on ${row.processCode} · ${row.processName}.`,
			todo: `Follow the steps on ${a.kind === 'self' ? 'your' : 'their'} Padbridge home page in order: read and acknowledge the instructions, take the knowledge check, then the practical sign-off with a trainer.`,
			details: [
				['Process', `${row.processCode} · ${row.processName}`],
				['Due', row.dueOn ?? 'no due date']
			],
			action: { label: 'Open Padbridge', path: '/' }
		})
	});
}

/** A certificate was suspended by quality (call in the suspension's transaction). */
export async function queueSuspensionMail(
	tx: Tx,
	s: { certificateId: number; reason: string; at?: Date }
): Promise<QueueMailResult> {
	const at = s.at ?? new Date();
	const [cert] = await tx
		.select({
			personId: certificates.personId,
			number: certificates.number,
			processCode: processes.code,
			processName: processes.name
		})
		.from(certificates)
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.where(eq(certificates.id, s.certificateId));
	if (!cert) return { queued: 0, route: 'inactive', reason: 'no such certificate' };
	const zone = await siteZoneOf(cert.personId, tx);
	return queueMail(tx, {
		kind: 'suspended',
		dedupeKey: `suspended:certificate:${s.certificateId}:${at.getTime()}`,
		toPersonId: cert.personId,
		now: at,
		notice: (a) => ({
			subject: `${cert.processCode} certificate suspended`,
			summary: `Quality suspended ${your(a)} certificate ${cert.number} for ${cert.processCode} · ${cert.processName} on ${formatLocal(at, zone)}.`,
			todo: `Ask quality or ${a.kind === 'self' ? 'your' : 'the'} trainer what is needed to lift the suspension.`,
			caution: `Do not run ${cert.processCode} until the suspension is lifted: the station gate denies it.`,
			details: [
				['Certificate', cert.number],
				['Reason', s.reason]
			],
			action: { label: 'Open Padbridge', path: '/' }
		})
	});
}

/** A lead granted a supervised run: the person and the supervisor are told. */
export async function queueSupervisedRunMail(
	tx: Tx,
	r0: { supervisedRunId: number; now?: Date }
): Promise<number> {
	const person = alias(people, 'run_person');
	const supervisor = alias(people, 'run_supervisor');
	const granter = alias(people, 'run_granter');
	const [run] = await tx
		.select({
			personId: supervisedRuns.personId,
			supervisorId: supervisedRuns.supervisorId,
			personName: person.displayName,
			supervisorName: supervisor.displayName,
			grantedBy: granter.displayName,
			station: stations.code,
			reason: supervisedRuns.reason,
			startsAt: supervisedRuns.startsAt,
			endsAt: supervisedRuns.endsAt
		})
		.from(supervisedRuns)
		.innerJoin(person, eq(person.id, supervisedRuns.personId))
		.innerJoin(supervisor, eq(supervisor.id, supervisedRuns.supervisorId))
		.innerJoin(granter, eq(granter.id, supervisedRuns.grantedBy))
		.innerJoin(stations, eq(stations.id, supervisedRuns.stationId))
		.where(eq(supervisedRuns.id, r0.supervisedRunId));
	if (!run) return 0;
	const zone = await siteZoneOf(run.personId, tx);
	const window = `${formatLocal(run.startsAt, zone)} to ${formatLocal(run.endsAt, zone)}`;
	const details: [string, string][] = [
		['Station', run.station],
		['Operator', run.personName],
		['Supervisor', run.supervisorName],
		['From – until', window],
		['Reason', run.reason],
		['Granted by', run.grantedBy]
	];
	const caution =
		'The supervisor stays at the station for the whole run. Hot heads, pinch points and IPA: follow the instruction in force and the plant safety rules.';
	let queued = 0;
	const toPerson = await queueMail(tx, {
		kind: 'supervised_run',
		dedupeKey: `supervised_run:run:${r0.supervisedRunId}:person`,
		toPersonId: run.personId,
		now: r0.now,
		notice: (a) => ({
			subject: `Supervised run on ${run.station} until ${formatLocal(run.endsAt, zone)}`,
			summary: `${run.grantedBy} granted ${a.kind === 'self' ? 'you' : run.personName} a supervised run on ${run.station}, with ${run.supervisorName} supervising.`,
			todo: `Run ${run.station} only while ${run.supervisorName} is present, and only until ${formatLocal(run.endsAt, zone)}.`,
			caution,
			details,
			action: { label: 'Open Padbridge', path: '/' }
		})
	});
	queued += toPerson.queued;
	const toSupervisor = await queueMail(tx, {
		kind: 'supervised_run',
		dedupeKey: `supervised_run:run:${r0.supervisedRunId}:supervisor`,
		toPersonId: run.supervisorId,
		aboutPersonId: run.supervisorId,
		now: r0.now,
		notice: (a) => ({
			subject: `Supervising ${run.personName} on ${run.station}`,
			summary: `${run.grantedBy} granted ${run.personName} a supervised run on ${run.station} with ${a.kind === 'self' ? 'you' : run.supervisorName} as the qualified supervisor.`,
			todo: `Stay at ${run.station} while ${run.personName} runs it, until ${formatLocal(run.endsAt, zone)}.`,
			caution,
			details,
			action: { label: 'Open Padbridge', path: '/' }
		})
	});
	return queued + toSupervisor.queued;
}
