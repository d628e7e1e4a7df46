// Demo instructions for KBO-2: each with two or three revisions (older ones superseded, one draft,
// one in review, one approved for a future instant), images made here from SVG and stored in S3,
// and signatures by the quality account on every approved revision.
import { createHash, randomUUID } from 'node:crypto';
import { eq, inArray } from 'drizzle-orm';
import sharp from 'sharp';
import { db } from '../src/lib/server/db/index';
import {
	instructionStations,
	instructions,
	people,
	processes,
	revisionFiles,
	revisions,
	stations
} from '../src/lib/server/db/schema/index';
import { recordAudit } from '../src/lib/server/audit/index';
import { computeContentHash } from '../src/lib/server/instructions/hash';
import { insertSignature } from '../src/lib/server/instructions/signatures';
import { bumpSearchEpoch } from '../src/lib/server/instructions/workflow';
import { putObject } from '../src/lib/server/storage/index';
import { localDate, zonedToUtc } from '../src/lib/time';
import { DEMO_INSTRUCTIONS } from './seed-instruction-content';

const ZONE = 'Asia/Ho_Chi_Minh';
const DAY = 86_400_000;

/** 06:00 plant time, `days` from today (negative: in the past). */
function plantMorning(days: number): Date {
	return zonedToUtc(localDate(new Date(Date.now() + days * DAY), ZONE), '06:00', ZONE);
}

async function personByEmail(email: string) {
	const [p] = await db
		.select({ id: people.id, displayName: people.displayName })
		.from(people)
		.where(eq(people.email, email));
	if (!p) throw new Error(`demo account ${email} missing`);
	return p;
}

export async function seedInstructions() {
	const started = Date.now();
	const trainer = await personByEmail('trainer@kbo2.example');
	const quality = await personByEmail('quality@kbo2.example');
	const procRows = await db.select({ id: processes.id, code: processes.code }).from(processes);
	const stationRows = await db.select({ id: stations.id, code: stations.code }).from(stations);
	const procId = (c: string | null) =>
		c ? (procRows.find((p) => p.code === c)?.id ?? null) : null;

	// Render the illustrations once; every revision that shows one gets its own stored copy.
	const images = new Map<string, Buffer>();
	for (const d of DEMO_INSTRUCTIONS)
		for (const img of d.images)
			images.set(img.name, await sharp(Buffer.from(img.svg)).png().toBuffer());

	let revisionCount = 0;
	await db.transaction(async (tx) => {
		for (const d of DEMO_INSTRUCTIONS) {
			const [{ id: instructionId }] = await tx
				.insert(instructions)
				.values({
					docNumber: d.docNumber,
					title: d.title,
					processId: procId(d.process),
					ownerId: trainer.id,
					reviewDueOn: localDate(new Date(Date.now() + d.reviewDueInDays * DAY), ZONE),
					createdAt: new Date(Date.now() - 430 * DAY)
				})
				.$returningId();
			const ids = stationRows.filter((s) => d.stations.includes(s.code)).map((s) => s.id);
			if (ids.length)
				await tx
					.insert(instructionStations)
					.values(ids.map((stationId) => ({ instructionId, stationId })));

			for (const r of d.revisions) {
				revisionCount++;
				const approved =
					r.kind === 'superseded' || r.kind === 'effective' || r.kind === 'scheduled';
				const effectiveFrom = approved ? plantMorning(-r.daysAgo) : null;
				const createdAt = new Date(Date.now() - (Math.abs(r.daysAgo) + 10) * DAY);
				const approvedAt = approved
					? new Date(Math.min(Date.now(), effectiveFrom!.getTime()) - 3 * DAY)
					: null;
				const [{ id: revisionId }] = await tx
					.insert(revisions)
					.values({
						instructionId,
						letter: r.letter,
						state: approved ? 'approved' : r.kind,
						source: r.source,
						contentHash: computeContentHash(r.source, []),
						changeSummary: r.kind === 'draft' ? null : r.summary,
						reason: r.kind === 'draft' ? null : r.reason,
						classification: r.kind === 'draft' ? null : r.classification,
						authorId: trainer.id,
						lastEditedBy: trainer.id,
						createdAt,
						updatedAt: createdAt,
						submittedAt: r.kind === 'draft' ? null : new Date(createdAt.getTime() + 2 * DAY),
						approvedAt,
						approvedBy: approved ? quality.id : null,
						effectiveFrom
					})
					.$returningId();
				const files: { originalName: string; sha256: string }[] = [];
				for (const img of d.images) {
					if (!r.source.includes(`asset:${img.name}`)) continue;
					const bytes = images.get(img.name)!;
					const storageKey = `revisions/${revisionId}/${randomUUID()}.png`;
					await putObject(storageKey, bytes, 'image/png');
					const meta = await sharp(bytes).metadata();
					const sha256 = createHash('sha256').update(bytes).digest('hex');
					await tx.insert(revisionFiles).values({
						revisionId,
						kind: 'image',
						storageKey,
						originalName: img.name,
						contentType: 'image/png',
						sizeBytes: bytes.byteLength,
						sha256,
						widthPx: meta.width ?? null,
						heightPx: meta.height ?? null,
						uploadedBy: trainer.id,
						createdAt
					});
					files.push({ originalName: img.name, sha256 });
				}
				const contentHash = computeContentHash(r.source, files);
				await tx.update(revisions).set({ contentHash }).where(eq(revisions.id, revisionId));
				if (approved) {
					await insertSignature(tx, {
						recordId: revisionId,
						signerId: quality.id,
						printedName: quality.displayName,
						meaning: 'approved',
						contentHash,
						signedAt: approvedAt!
					});
				}
			}
		}
		await bumpSearchEpoch(tx);
		await recordAudit(tx, null, {
			action: 'demo.instructions_loaded',
			entityType: 'instruction',
			newValues: { instructions: DEMO_INSTRUCTIONS.length, revisions: revisionCount },
			reason: 'demo work instructions loaded with the demo plant'
		});
	});
	const n = await db
		.select({ id: instructions.id })
		.from(instructions)
		.where(
			inArray(
				instructions.docNumber,
				DEMO_INSTRUCTIONS.map((d) => d.docNumber)
			)
		);
	console.log(
		`${n.length} demo instructions, ${revisionCount} revisions loaded in ${Date.now() - started} ms`
	);
}
