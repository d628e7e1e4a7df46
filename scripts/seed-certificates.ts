// Demo training history: acknowledgements, passed checks and countersigned sign-offs at past
// instants, certificates issued from them by the real rule evaluation, then the lifecycle job run
// now, so the demo holds certificates in every state (valid, expiring, expired, retraining due and
// overdue, suspended, withdrawn, superseded by renewal) and every one has its basis and audit row.
import { and, eq, inArray, isNotNull } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import {
	acknowledgements,
	certificates,
	checkAttempts,
	checklists,
	checkVersions,
	people,
	checklistItems,
	processes,
	revisions,
	signoffItems,
	signoffs
} from '../src/lib/server/db/schema/index';
import { insertSignature } from '../src/lib/server/instructions/signatures';
import {
	SIGNOFF_RECORD_TYPE,
	computeSignoffHash,
	loadSignoffItems
} from '../src/lib/server/training/signoffs/signoffs';
import { recordAudit } from '../src/lib/server/audit/index';
import { evaluatePerson, rulesInForce } from '../src/lib/server/certificates/evaluate';
import { evaluateAndIssue } from '../src/lib/server/certificates/issue';
import { runCertificateLifecycle } from '../src/lib/server/certificates/lifecycle';

const DAY = 86_400_000;

/** Who holds what, and since how many days; `then` applies a later state change by quality. */
interface Plan {
	badge: string;
	process: string;
	daysAgo: number[];
	then?: { state: 'suspended' | 'withdrawn'; reason: string; daysAgo: number };
}

const PLANS: Plan[] = [
	// Trainers hold the processes they sign off (their own sign-offs were observed by 김민준).
	{ badge: 'KB-30003', process: 'COG-MB', daysAgo: [100] },
	{ badge: 'KB-30003', process: 'FOG-MB', daysAgo: [90] },
	{ badge: 'KB-30003', process: 'ACF-LAM', daysAgo: [90] },
	{ badge: 'KB-30008', process: 'FOG-MB', daysAgo: [80] },
	{ badge: 'KB-30008', process: 'FOB-MB', daysAgo: [80] },
	{ badge: 'KB-30009', process: 'COG-MB', daysAgo: [120] },
	// Line 1, COG main bond: valid, expiring, expired, retraining overdue, suspended, renewed.
	{ badge: 'KB-10423', process: 'COG-MB', daysAgo: [40] },
	{ badge: 'KB-10424', process: 'COG-MB', daysAgo: [352] },
	{ badge: 'KB-10425', process: 'COG-MB', daysAgo: [200] },
	{ badge: 'KB-10426', process: 'COG-MB', daysAgo: [395] },
	{ badge: 'KB-10427', process: 'COG-MB', daysAgo: [380, 20] },
	{
		badge: 'KB-10428',
		process: 'COG-MB',
		daysAgo: [60],
		then: {
			state: 'suspended',
			reason: 'Two bonds with low indentation count on 2026-11-24; re-observation pending.',
			daysAgo: 7
		}
	},
	{ badge: 'KB-10429', process: 'COG-MB', daysAgo: [30] },
	{ badge: 'KB-10430', process: 'ESD-BASIC', daysAgo: [358] },
	{ badge: 'KB-10423', process: 'ACF-LAM', daysAgo: [50] },
	{ badge: 'KB-10424', process: 'ACF-LAM', daysAgo: [45] },
	{ badge: 'AG-2201', process: 'ACF-LAM', daysAgo: [25] },
	// Indentation inspection: WI-INSP-007 rev B needs retraining and became effective 6 days ago.
	{ badge: 'KB-10431', process: 'INSP-IND', daysAgo: [30] },
	{ badge: 'KB-10432', process: 'INSP-IND', daysAgo: [45] },
	{ badge: 'KB-10442', process: 'INSP-IND', daysAgo: [3] },
	// Line 2, FOG main bond.
	{ badge: 'KB-10434', process: 'FOG-MB', daysAgo: [35] },
	{ badge: 'KB-10435', process: 'FOG-MB', daysAgo: [345] },
	{ badge: 'KB-10436', process: 'FOG-MB', daysAgo: [150] },
	{ badge: 'KB-10437', process: 'FOG-MB', daysAgo: [375] },
	{
		badge: 'KB-10438',
		process: 'FOG-MB',
		daysAgo: [70],
		then: {
			state: 'withdrawn',
			reason: 'Left the FOG team; qualification withdrawn at the person’s request.',
			daysAgo: 12
		}
	},
	{ badge: 'KB-10439', process: 'FOG-MB', daysAgo: [60] },
	{ badge: 'KB-10440', process: 'FOB-MB', daysAgo: [55] },
	{ badge: 'AG-2202', process: 'FOG-MB', daysAgo: [20] },
	// ESD basics for everyone on the floor who has something else.
	...[
		'KB-10421',
		'KB-10423',
		'KB-10424',
		'KB-10425',
		'KB-10434',
		'KB-10435',
		'KB-10436',
		'KB-10439'
	].map((badge) => ({ badge, process: 'ESD-BASIC', daysAgo: [200] }))
];

export async function seedCertificates(): Promise<void> {
	const started = Date.now();
	const badgeRows = await db
		.select({ id: people.id, badge: people.badgeNo, lineId: people.lineId })
		.from(people)
		.where(isNotNull(people.badgeNo));
	const byBadge = new Map(badgeRows.map((p) => [p.badge!, p]));
	const procRows = await db.select({ id: processes.id, code: processes.code }).from(processes);
	const procId = new Map(procRows.map((p) => [p.code, p.id]));
	const quality = byBadge.get('KB-30002')!;
	const observerFor = (badge: string) =>
		byBadge.get(badge.startsWith('KB-300') ? 'KB-30009' : 'KB-30003')!;

	let issued = 0;
	for (const plan of PLANS) {
		const person = byBadge.get(plan.badge);
		const processId = procId.get(plan.process);
		if (!person || !processId) throw new Error(`demo plan ${plan.badge} ${plan.process} broken`);
		for (const daysAgo of plan.daysAgo) {
			const at = new Date(Date.now() - daysAgo * DAY);
			await recordEvidence(person.id, processId, at, observerFor(plan.badge).id);
			const r = await evaluateAndIssue(person.id, processId, { now: at });
			if (!r.certificateId) {
				throw new Error(`demo certificate ${plan.badge} ${plan.process} not issued: ${r.missing}`);
			}
			issued++;
			if (plan.then && daysAgo === plan.daysAgo.at(-1)) {
				const when = new Date(Date.now() - plan.then.daysAgo * DAY);
				await db.transaction(async (tx) => {
					await tx
						.update(certificates)
						.set({
							state: plan.then!.state,
							stateReason: plan.then!.reason,
							stateChangedAt: when,
							stateChangedBy: quality.id
						})
						.where(eq(certificates.id, r.certificateId!));
					await recordAudit(
						tx,
						{ id: quality.id, label: 'Nguyễn Thị Minh Châu' },
						{
							action: `certificate.${plan.then!.state}`,
							entityType: 'certificate',
							entityId: r.certificateId,
							oldValues: { state: 'active' },
							newValues: { state: plan.then!.state, number: r.number },
							reason: plan.then!.reason
						}
					);
				});
			}
		}
	}
	const moved = await runCertificateLifecycle(new Date());
	console.log(
		`${issued} demo certificates issued (${moved.expired} expired, ${moved.retrainingDue} retraining due) in ${Date.now() - started} ms`
	);
}

/**
 * What a person did to earn a certificate at `at`: acknowledged each instruction's revision in
 * force then, passed the rule's knowledge check, and was observed at the bonder.
 */
const nameOf = new Map<number, string>();

async function recordEvidence(personId: number, processId: number, at: Date, observerId: number) {
	if (!nameOf.size) {
		for (const p of await db.select({ id: people.id, name: people.displayName }).from(people))
			nameOf.set(p.id, p.name);
	}
	const rule = (await rulesInForce([processId], at)).get(processId);
	if (!rule) throw new Error(`no rule in force for process ${processId} at ${at.toISOString()}`);
	const ev = await evaluatePerson(personId, processId, at);
	for (const req of ev?.requirements ?? []) {
		if (req.kind !== 'acknowledgement' || req.met || !req.revisionId) continue;
		await db
			.insert(acknowledgements)
			.values({
				personId,
				revisionId: req.revisionId,
				method: 'pin',
				contentHash: await revisionHash(req.revisionId),
				acknowledgedAt: new Date(at.getTime() - 3_600_000)
			})
			.onDuplicateKeyUpdate({ set: { personId } });
	}
	if (rule.checkId) {
		const [version] = await db
			.select({ id: checkVersions.id })
			.from(checkVersions)
			.where(
				and(
					eq(checkVersions.checkId, rule.checkId),
					inArray(checkVersions.state, ['approved', 'retired'])
				)
			)
			.limit(1);
		if (version) {
			await db.insert(checkAttempts).values({
				personId,
				checkVersionId: version.id,
				processId,
				passMarkPct: rule.passMarkPct,
				state: 'submitted',
				startedAt: new Date(at.getTime() - 40 * 60_000),
				submittedAt: new Date(at.getTime() - 30 * 60_000),
				scorePct: 100,
				passed: true
			});
		}
	}
	if (rule.practicalRequired && rule.checklistId) {
		const [list] = await db
			.select({ revisionId: checklists.revisionId })
			.from(checklists)
			.where(eq(checklists.id, rule.checklistId));
		const signedAt = new Date(at.getTime() - 10 * 60_000);
		await db.transaction(async (tx) => {
			const row = {
				personId,
				checklistId: rule.checklistId!,
				processId,
				revisionId: list.revisionId,
				stationId: null,
				trainerId: observerId
			};
			const [{ id }] = await tx
				.insert(signoffs)
				.values({
					...row,
					state: 'draft',
					createdAt: new Date(signedAt.getTime() - 20 * 60_000)
				})
				.$returningId();
			const steps = await tx
				.select({ id: checklistItems.id })
				.from(checklistItems)
				.where(eq(checklistItems.checklistId, rule.checklistId!));
			await tx
				.insert(signoffItems)
				.values(steps.map((s) => ({ signoffId: id, itemId: s.id, result: 'pass' as const })));
			// Both signatures bound to the same content hash the sign-off page verifies.
			const contentHash = computeSignoffHash({ id, ...row }, await loadSignoffItems(id, tx));
			await tx
				.update(signoffs)
				.set({
					state: 'countersigned',
					passed: true,
					contentHash,
					trainerSignedAt: signedAt,
					operatorSignedAt: signedAt
				})
				.where(eq(signoffs.id, id));
			for (const [signerId, meaning] of [
				[observerId, 'observed'],
				[personId, 'countersigned']
			] as const) {
				await insertSignature(tx, {
					recordType: SIGNOFF_RECORD_TYPE,
					recordId: id,
					signerId,
					printedName: nameOf.get(signerId) ?? '',
					meaning,
					contentHash,
					signedAt
				});
			}
		});
	}
}

async function revisionHash(revisionId: number): Promise<string> {
	const [r] = await db
		.select({ h: revisions.contentHash })
		.from(revisions)
		.where(eq(revisions.id, revisionId));
	return r.h;
}
