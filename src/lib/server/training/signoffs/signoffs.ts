// Practical sign-offs: a trainer observes an operator at the bonder against a checklist, marks each
// step pass or fail (comment, optional photo), signs with their password (meaning "observed"), and
// the operator countersigns with their own PIN or password. Both signatures are bound to a sha256
// over the steps' results, comments and photo hashes; steps are read-only once the trainer signs.
//
// A sign-off with any failed step is final at the trainer's signature (state "failed"): nothing is
// issued on it, so no countersign is asked; the operator still sees it among their sign-offs.
import { createHash, randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray, like, or, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db';
import {
	checklistItems,
	checklists,
	instructions,
	people,
	processes,
	revisions,
	signatures,
	signoffItems,
	signoffs,
	stations
} from '../../db/schema';
import { recordAudit, type Actor } from '../../audit';
import { canonicalJson } from '../../audit/chain';
import { reauthenticate } from '../../auth/reauth';
import { Refusal } from '../../errors';
import { insertSignature } from '../../instructions/signatures';
import { checkUpload } from '../../instructions/files';
import { putObject } from '../../storage';
import { qualifyingCertificate } from '../../certificates/queries';
import { evaluateAndIssue } from '../../certificates/issue';
import type { Role } from '../../../roles';

export const SIGNOFF_RECORD_TYPE = 'signoff';

type Viewer = { id: number; roles: readonly Role[] };
type SignActor = Actor & { id: number };

const SEES_ALL: Role[] = ['quality', 'admin'];
const seesAll = (v: Viewer) => v.roles.some((r) => SEES_ALL.includes(r));

const notFound = () => new Refusal(404, 'No such sign-off.');

/** Active people a trainer can pick, by name, employee number or badge. */
export async function findPeopleToObserve(q: string) {
	const term = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
	return db
		.select({ id: people.id, displayName: people.displayName, employeeNo: people.employeeNo })
		.from(people)
		.where(
			and(
				eq(people.active, true),
				q
					? or(
							like(people.displayName, term),
							like(people.employeeNo, term),
							like(people.badgeNo, term)
						)
					: undefined
			)
		)
		.orderBy(asc(people.displayName))
		.limit(q ? 30 : 60);
}

/** Checklists in use (not retired) and active stations, for the start form. */
export async function listStartChoices() {
	const lists = await db
		.select({
			id: checklists.id,
			title: checklists.title,
			processCode: processes.code,
			docNumber: instructions.docNumber,
			letter: revisions.letter
		})
		.from(checklists)
		.innerJoin(processes, eq(processes.id, checklists.processId))
		.innerJoin(revisions, eq(revisions.id, checklists.revisionId))
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(sql`${checklists.retiredAt} is null`)
		.orderBy(asc(processes.code), asc(checklists.title));
	const sts = await db
		.select({ id: stations.id, code: stations.code })
		.from(stations)
		.where(eq(stations.active, true))
		.orderBy(asc(stations.code));
	return { checklists: lists, stations: sts };
}

async function processLabel(processId: number) {
	const [p] = await db
		.select({ code: processes.code, name: processes.name })
		.from(processes)
		.where(eq(processes.id, processId));
	return p ? `${p.code} (${p.name})` : `process ${processId}`;
}

/** Refuses self-observation and a trainer without a qualifying certificate for the process. */
async function assertMayObserve(trainerId: number, personId: number, processId: number) {
	if (trainerId === personId)
		throw new Refusal(
			403,
			'You cannot sign off your own practical. Another trainer who holds the certificate must observe you.',
			{ personId: 'You cannot observe yourself.' }
		);
	const cert = await qualifyingCertificate(trainerId, processId);
	if (!cert)
		throw new Refusal(
			403,
			`You do not hold a valid certificate for ${await processLabel(processId)}, so you cannot observe its practical sign-off. Ask a trainer certified on it.`,
			{ checklistId: 'You are not certified on this process.' }
		);
}

export async function startSignoff(
	actor: SignActor,
	input: { personId: number; checklistId: number; stationId: number | null }
): Promise<number> {
	const [person] = await db
		.select({ id: people.id, active: people.active })
		.from(people)
		.where(eq(people.id, input.personId));
	if (!person?.active)
		throw new Refusal(400, 'Choose an active person to observe.', {
			personId: 'Choose an active person to observe.'
		});
	const [list] = await db.select().from(checklists).where(eq(checklists.id, input.checklistId));
	if (!list || list.retiredAt)
		throw new Refusal(400, 'Choose a checklist that is in use.', {
			checklistId: 'Choose a checklist that is in use.'
		});
	if (input.stationId) {
		const [st] = await db
			.select({ id: stations.id })
			.from(stations)
			.where(and(eq(stations.id, input.stationId), eq(stations.active, true)));
		if (!st) throw new Refusal(400, 'No such station.', { stationId: 'No such station.' });
	}
	await assertMayObserve(actor.id, input.personId, list.processId);
	return db.transaction(async (tx) => {
		const [{ id }] = await tx
			.insert(signoffs)
			.values({
				personId: input.personId,
				checklistId: list.id,
				processId: list.processId,
				revisionId: list.revisionId,
				stationId: input.stationId,
				trainerId: actor.id
			})
			.$returningId();
		const items = await tx
			.select({ id: checklistItems.id })
			.from(checklistItems)
			.where(eq(checklistItems.checklistId, list.id));
		await tx.insert(signoffItems).values(items.map((i) => ({ signoffId: id, itemId: i.id })));
		await recordAudit(tx, actor, {
			action: 'signoff.started',
			entityType: 'signoff',
			entityId: id,
			newValues: {
				personId: input.personId,
				checklistId: list.id,
				processId: list.processId,
				revisionId: list.revisionId,
				stationId: input.stationId,
				state: 'draft'
			}
		});
		return id;
	});
}

async function loadSignoff(id: number, conn: DbOrTx = db, lock = false) {
	const q = conn.select().from(signoffs).where(eq(signoffs.id, id));
	const [s] = lock ? await q.for('update') : await q;
	return s ?? null;
}

export async function loadSignoffItems(signoffId: number, conn: DbOrTx = db) {
	return conn
		.select({
			itemId: signoffItems.itemId,
			position: checklistItems.position,
			text: checklistItems.text,
			result: signoffItems.result,
			comment: signoffItems.comment,
			photoKey: signoffItems.photoKey,
			photoType: signoffItems.photoType
		})
		.from(signoffItems)
		.innerJoin(checklistItems, eq(checklistItems.id, signoffItems.itemId))
		.where(eq(signoffItems.signoffId, signoffId))
		.orderBy(asc(checklistItems.position));
}

/** The photo's sha256, which is part of its object key (see saveSignoffItem). */
const photoSha = (key: string | null) =>
	key ? (/([0-9a-f]{64})\.\w+$/.exec(key)?.[1] ?? key) : null;

/** sha256 over what both signatures vouch for: who, what checklist, and every step's outcome. */
export function computeSignoffHash(
	s: Pick<
		typeof signoffs.$inferSelect,
		'id' | 'personId' | 'trainerId' | 'checklistId' | 'revisionId' | 'stationId'
	>,
	items: Awaited<ReturnType<typeof loadSignoffItems>>
): string {
	const body = {
		signoffId: s.id,
		personId: s.personId,
		trainerId: s.trainerId,
		checklistId: s.checklistId,
		revisionId: s.revisionId,
		stationId: s.stationId,
		items: items.map((i) => ({
			itemId: i.itemId,
			position: i.position,
			text: i.text,
			result: i.result,
			comment: i.comment ?? '',
			photoSha256: photoSha(i.photoKey)
		}))
	};
	return createHash('sha256').update(canonicalJson(body)).digest('hex');
}

function mayView(v: Viewer, s: { personId: number; trainerId: number }) {
	return v.id === s.personId || v.id === s.trainerId || seesAll(v);
}

/** The sign-off as its viewer may see it; 404 for anyone who is not its operator, trainer, quality or admin. */
export async function getSignoffForViewer(viewer: Viewer, id: number) {
	const s = await loadSignoff(id);
	if (!s || !mayView(viewer, s)) throw notFound();
	const [meta] = await db
		.select({
			personName: sql<string>`(select display_name from people where id = ${signoffs.personId})`,
			trainerName: sql<string>`(select display_name from people where id = ${signoffs.trainerId})`,
			processCode: processes.code,
			processName: processes.name,
			docNumber: instructions.docNumber,
			letter: revisions.letter,
			checklistTitle: checklists.title,
			stationCode: stations.code
		})
		.from(signoffs)
		.innerJoin(processes, eq(processes.id, signoffs.processId))
		.innerJoin(revisions, eq(revisions.id, signoffs.revisionId))
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.innerJoin(checklists, eq(checklists.id, signoffs.checklistId))
		.leftJoin(stations, eq(stations.id, signoffs.stationId))
		.where(eq(signoffs.id, id));
	const items = await loadSignoffItems(id);
	const sigs = await db
		.select({
			printedName: signatures.printedName,
			meaning: signatures.meaning,
			signedAt: signatures.signedAt,
			contentHash: signatures.contentHash
		})
		.from(signatures)
		.where(and(eq(signatures.recordType, SIGNOFF_RECORD_TYPE), eq(signatures.recordId, id)))
		.orderBy(asc(signatures.signedAt));
	const current = s.contentHash ? computeSignoffHash(s, items) : null;
	return {
		id: s.id,
		state: s.state,
		passed: s.passed,
		createdAt: s.createdAt,
		trainerSignedAt: s.trainerSignedAt,
		operatorSignedAt: s.operatorSignedAt,
		...meta,
		isTrainer: viewer.id === s.trainerId,
		isOperator: viewer.id === s.personId,
		items: items.map((i) => ({
			itemId: i.itemId,
			position: i.position,
			text: i.text,
			result: i.result,
			comment: i.comment,
			hasPhoto: !!i.photoKey
		})),
		signatures: sigs.map((g) => ({
			printedName: g.printedName,
			meaning: g.meaning,
			signedAt: g.signedAt,
			valid: current !== null && g.contentHash === current
		}))
	};
}

/** Where a step's photo is stored, for someone who may see the sign-off. */
export async function getSignoffPhoto(viewer: Viewer, signoffId: number, itemId: number) {
	const s = await loadSignoff(signoffId);
	if (!s || !mayView(viewer, s)) throw notFound();
	const [i] = await db
		.select({ key: signoffItems.photoKey, type: signoffItems.photoType })
		.from(signoffItems)
		.where(and(eq(signoffItems.signoffId, signoffId), eq(signoffItems.itemId, itemId)));
	if (!i?.key || !i.type) throw new Refusal(404, 'No photo for this step.');
	return { key: i.key, type: i.type };
}

/** Records one step's result and comment (and an optional photo) while the sign-off is a draft. */
export async function saveSignoffItem(
	actor: SignActor & { roles: readonly Role[] },
	signoffId: number,
	input: { itemId: number; result: 'pass' | 'fail'; comment: string; photo?: File | null }
) {
	const s = await loadSignoff(signoffId);
	if (!s || !mayView(actor, s)) throw notFound();
	if (s.trainerId !== actor.id)
		throw new Refusal(403, 'Only the trainer who started this sign-off can record its steps.');
	if (s.state !== 'draft')
		throw new Refusal(409, 'The trainer has signed this sign-off; its steps are read-only.');
	let photo: { key: string; type: string; sha256: string } | null = null;
	if (input.photo && input.photo.size > 0) {
		const bytes = new Uint8Array(await input.photo.arrayBuffer());
		let checked;
		try {
			checked = await checkUpload({ name: input.photo.name, bytes }, true);
		} catch (err) {
			if (err instanceof Refusal)
				throw new Refusal(err.status, err.message, { photo: err.fields?.file ?? err.message });
			throw err;
		}
		const key = `signoffs/${signoffId}/${randomUUID()}-${checked.sha256}.${checked.ext}`;
		await putObject(key, checked.stored, checked.mime);
		photo = { key, type: checked.mime, sha256: checked.sha256 };
	}
	await db.transaction(async (tx) => {
		const locked = await loadSignoff(signoffId, tx, true);
		if (locked?.state !== 'draft')
			throw new Refusal(409, 'The trainer has signed this sign-off; its steps are read-only.');
		const [before] = await tx
			.select()
			.from(signoffItems)
			.where(and(eq(signoffItems.signoffId, signoffId), eq(signoffItems.itemId, input.itemId)));
		if (!before) throw new Refusal(404, 'No such step in this sign-off.');
		await tx
			.update(signoffItems)
			.set({
				result: input.result,
				comment: input.comment || null,
				...(photo ? { photoKey: photo.key, photoType: photo.type } : {})
			})
			.where(and(eq(signoffItems.signoffId, signoffId), eq(signoffItems.itemId, input.itemId)));
		await recordAudit(tx, actor, {
			action: 'signoff.step_recorded',
			entityType: 'signoff',
			entityId: signoffId,
			oldValues: {
				itemId: input.itemId,
				result: before.result,
				comment: before.comment,
				photoSha256: photoSha(before.photoKey)
			},
			newValues: {
				itemId: input.itemId,
				result: input.result,
				comment: input.comment || null,
				photoSha256: photo ? photo.sha256 : photoSha(before.photoKey)
			}
		});
	});
}

/** The trainer's signature ("observed"): needs every step marked; the steps freeze. */
export async function signSignoff(
	actor: SignActor & { roles: readonly Role[] },
	signoffId: number,
	password: string
) {
	const s = await loadSignoff(signoffId);
	if (!s || !mayView(actor, s)) throw notFound();
	if (s.trainerId !== actor.id)
		throw new Refusal(403, 'Only the trainer who observed can sign this sign-off.');
	if (s.state !== 'draft') throw new Refusal(409, 'This sign-off is already signed.');
	await assertMayObserve(actor.id, s.personId, s.processId);
	const open = (await loadSignoffItems(signoffId)).filter((i) => !i.result).length;
	if (open)
		throw new Refusal(
			400,
			`Mark every step first: ${open} step${open === 1 ? ' is' : 's are'} not marked pass or fail.`
		);
	const { printedName } = await reauthenticate(
		actor,
		password,
		{ type: 'signoff', id: signoffId, label: `sign-off ${signoffId}` },
		['password']
	);
	return db.transaction(async (tx) => {
		const locked = await loadSignoff(signoffId, tx, true);
		if (!locked || locked.state !== 'draft')
			throw new Refusal(409, 'This sign-off is already signed.');
		const items = await loadSignoffItems(signoffId, tx);
		if (items.some((i) => !i.result)) throw new Refusal(400, 'Mark every step first.');
		const passed = items.every((i) => i.result === 'pass');
		const contentHash = computeSignoffHash(locked, items);
		const signedAt = new Date();
		const state = passed ? ('trainer_signed' as const) : ('failed' as const);
		await tx
			.update(signoffs)
			.set({ state, passed, contentHash, trainerSignedAt: signedAt })
			.where(eq(signoffs.id, signoffId));
		const sig = await insertSignature(tx, {
			recordType: SIGNOFF_RECORD_TYPE,
			recordId: signoffId,
			signerId: actor.id,
			printedName,
			meaning: 'observed',
			contentHash,
			signedAt
		});
		await recordAudit(tx, actor, {
			action: 'signoff.signed',
			entityType: 'signoff',
			entityId: signoffId,
			oldValues: { state: 'draft' },
			newValues: { state, passed, contentHash, signatureId: sig.id, meaning: 'observed' }
		});
		return { state, passed };
	});
}

/** The operator's countersignature with their own PIN or password; then the rule is evaluated. */
export async function countersignSignoff(
	actor: SignActor & { roles: readonly Role[] },
	signoffId: number,
	secret: string
) {
	const s = await loadSignoff(signoffId);
	if (!s || !mayView(actor, s)) throw notFound();
	if (s.personId !== actor.id)
		throw new Refusal(403, 'Only the operator who was observed can countersign this sign-off.');
	if (s.state !== 'trainer_signed')
		throw new Refusal(
			409,
			s.state === 'draft'
				? 'The trainer has not signed this sign-off yet.'
				: 'This sign-off is not waiting for your countersignature.'
		);
	const { printedName } = await reauthenticate(
		actor,
		secret,
		{ type: 'signoff', id: signoffId, label: `sign-off ${signoffId}` },
		['pin', 'password']
	);
	await db.transaction(async (tx) => {
		const locked = await loadSignoff(signoffId, tx, true);
		if (!locked || locked.state !== 'trainer_signed')
			throw new Refusal(409, 'This sign-off is not waiting for your countersignature.');
		const contentHash = computeSignoffHash(locked, await loadSignoffItems(signoffId, tx));
		if (contentHash !== locked.contentHash)
			throw new Refusal(
				409,
				'The sign-off changed after the trainer signed it, so it cannot be countersigned. Tell quality.'
			);
		const signedAt = new Date();
		await tx
			.update(signoffs)
			.set({ state: 'countersigned', operatorSignedAt: signedAt })
			.where(eq(signoffs.id, signoffId));
		const sig = await insertSignature(tx, {
			recordType: SIGNOFF_RECORD_TYPE,
			recordId: signoffId,
			signerId: actor.id,
			printedName,
			meaning: 'countersigned',
			contentHash,
			signedAt
		});
		await recordAudit(tx, actor, {
			action: 'signoff.countersigned',
			entityType: 'signoff',
			entityId: signoffId,
			oldValues: { state: 'trainer_signed' },
			newValues: { state: 'countersigned', signatureId: sig.id, meaning: 'countersigned' }
		});
	});
	// After the commit: issuing is its own transaction, and a sign-off stays countersigned even if
	// the rest of the rule is not met yet.
	const issued = await evaluateAndIssue(s.personId, s.processId, { actor });
	return { issued };
}

const listColumns = {
	id: signoffs.id,
	state: signoffs.state,
	passed: signoffs.passed,
	createdAt: signoffs.createdAt,
	trainerSignedAt: signoffs.trainerSignedAt,
	personName: sql<string>`(select display_name from people where id = ${signoffs.personId})`,
	trainerName: sql<string>`(select display_name from people where id = ${signoffs.trainerId})`,
	processCode: processes.code,
	checklistTitle: checklists.title
};

/** Sign-offs a trainer started (quality and admin: everybody's), newest first. */
export async function listSignoffs(viewer: Viewer, limit = 100) {
	return db
		.select(listColumns)
		.from(signoffs)
		.innerJoin(processes, eq(processes.id, signoffs.processId))
		.innerJoin(checklists, eq(checklists.id, signoffs.checklistId))
		.where(seesAll(viewer) ? undefined : eq(signoffs.trainerId, viewer.id))
		.orderBy(desc(signoffs.createdAt))
		.limit(limit);
}

/** The operator's own sign-offs: waiting for their countersignature first, then the rest. */
export async function listMySignoffs(personId: number) {
	const rows = await db
		.select(listColumns)
		.from(signoffs)
		.innerJoin(processes, eq(processes.id, signoffs.processId))
		.innerJoin(checklists, eq(checklists.id, signoffs.checklistId))
		.where(
			and(
				eq(signoffs.personId, personId),
				inArray(signoffs.state, ['trainer_signed', 'countersigned', 'failed'])
			)
		)
		.orderBy(desc(signoffs.createdAt))
		.limit(100);
	return {
		waiting: rows.filter((r) => r.state === 'trainer_signed'),
		done: rows.filter((r) => r.state !== 'trainer_signed')
	};
}
