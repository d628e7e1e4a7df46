// Full-text search over instructions with flexsearch, built from the database on first use and
// rebuilt when this or another instance publishes (search_epoch) or an effective instant passes.
import FlexSearch from 'flexsearch';
import { eq, inArray } from 'drizzle-orm';
import { db } from '../db';
import { instructions, revisions, searchEpoch } from '../db/schema';
import { renderInstruction } from '../../markdown/render';
import { displayStatus, nextSwitchAfter, pickEffective } from '../instructions/effective';
import type { DisplayStatus } from '../../instructions/vocabulary';
import { makeSnippet, markMatches, queryTerms } from './snippet';

interface Entry {
	id: number;
	docNumber: string;
	title: string;
	letter: string;
	status: DisplayStatus;
	text: string;
	steps: string;
	/** What the indexed document was made from; a change means re-indexing it. */
	key: string;
}

export interface SearchHit {
	docNumber: string;
	title: string;
	titleHtml: string;
	letter: string;
	status: DisplayStatus;
	url: string;
	snippetHtml: string;
}

type Doc = { id: number; docNumber: string; title: string; steps: string; body: string };

type Field = 'docNumber' | 'title' | 'steps' | 'body';
const WEIGHTS: Record<Field, number> = {
	docNumber: 8,
	title: 4,
	steps: 2,
	body: 1
};
/** How often an instance asks the database whether someone else published. */
export const EPOCH_CHECK_MS = 2000;

// Prefix matching (results as you type) on number, title and step text; whole words in the rest
// of the body, which keeps indexing 3,000 revisions to a few seconds.
const newIndex = () =>
	new FlexSearch.Document<Doc>({
		encoder: 'LatinBalance',
		cache: false,
		document: {
			id: 'id',
			index: [
				{ field: 'docNumber', tokenize: 'forward' },
				{ field: 'title', tokenize: 'forward' },
				{ field: 'steps', tokenize: 'forward' },
				{ field: 'body', tokenize: 'strict' }
			]
		}
	});

type DocIndex = ReturnType<typeof newIndex>;

interface Built {
	effective: DocIndex;
	all: DocIndex;
	entries: Map<number, Entry>;
	effectiveIds: Set<number>;
	epoch: number;
	builtAt: Date;
	nextSwitch: Date | null;
	checkedAt: number;
}

let built: Built | null = null;
let building: Promise<Built> | null = null;

async function readEpoch(): Promise<number> {
	const [row] = await db
		.select({ epoch: searchEpoch.epoch })
		.from(searchEpoch)
		.where(eq(searchEpoch.id, 1));
	return row?.epoch ?? 0;
}

/**
 * Brings the indexes up to the database as of `now`. Only revisions whose content, title or
 * number changed are rendered and indexed again; the effective index gains and loses revisions as
 * the clock and approvals say. Pass null to build from nothing.
 */
export async function syncSearchIndex(prev: Built | null, now: Date = new Date()): Promise<Built> {
	const epoch = await readEpoch();
	const state: Built = prev ?? {
		effective: newIndex(),
		all: newIndex(),
		entries: new Map(),
		effectiveIds: new Set(),
		epoch: 0,
		builtAt: now,
		nextSwitch: null,
		checkedAt: 0
	};
	const insts = await db
		.select({
			id: instructions.id,
			docNumber: instructions.docNumber,
			title: instructions.title,
			withdrawnAt: instructions.withdrawnAt
		})
		.from(instructions);
	const revs = await db
		.select({
			id: revisions.id,
			instructionId: revisions.instructionId,
			letter: revisions.letter,
			state: revisions.state,
			effectiveFrom: revisions.effectiveFrom,
			contentHash: revisions.contentHash
		})
		.from(revisions);
	const instById = new Map(insts.map((i) => [i.id, i]));
	const byInstruction = new Map<number, typeof revs>();
	for (const r of revs) {
		const l = byInstruction.get(r.instructionId) ?? [];
		l.push(r);
		byInstruction.set(r.instructionId, l);
	}
	const effectiveIds = new Set<number>();
	for (const [instructionId, list] of byInstruction) {
		const eff = pickEffective(list, now, instById.get(instructionId)?.withdrawnAt ?? null);
		if (eff) effectiveIds.add(eff.id);
	}

	const keyOf = (r: (typeof revs)[number]) => {
		const i = instById.get(r.instructionId)!;
		return `${r.contentHash}|${i.docNumber}|${i.title}|${r.letter}`;
	};
	const stale = revs.filter((r) => state.entries.get(r.id)?.key !== keyOf(r));
	const docs = new Map<number, Doc>();
	for (let k = 0; k < stale.length; k += 500) {
		const ids = stale.slice(k, k + 500).map((r) => r.id);
		const rows = await db
			.select({ id: revisions.id, source: revisions.source })
			.from(revisions)
			.where(inArray(revisions.id, ids));
		for (const row of rows) {
			const r = stale.find((x) => x.id === row.id)!;
			const i = instById.get(r.instructionId)!;
			const rendered = await renderInstruction(row.source);
			docs.set(row.id, {
				id: row.id,
				docNumber: i.docNumber,
				title: i.title,
				steps: rendered.steps.join(' \n '),
				body: rendered.text
			});
		}
	}

	const alive = new Set(revs.map((r) => r.id));
	for (const id of state.entries.keys()) {
		if (alive.has(id)) continue;
		state.all.remove(id);
		if (state.effectiveIds.has(id)) state.effective.remove(id);
		state.entries.delete(id);
	}
	for (const id of state.effectiveIds) {
		if (!effectiveIds.has(id) && alive.has(id)) state.effective.remove(id);
	}
	for (const r of revs) {
		const doc = docs.get(r.id);
		const eff = pickEffective(
			byInstruction.get(r.instructionId)!,
			now,
			instById.get(r.instructionId)?.withdrawnAt ?? null
		);
		const status = displayStatus(r, eff?.id ?? null, now);
		const prevEntry = state.entries.get(r.id);
		if (doc) {
			if (prevEntry) state.all.update(doc);
			else state.all.add(doc);
			state.entries.set(r.id, {
				id: r.id,
				docNumber: doc.docNumber,
				title: doc.title,
				letter: r.letter,
				status,
				text: doc.body,
				steps: doc.steps,
				key: keyOf(r)
			});
		} else if (prevEntry) {
			prevEntry.status = status;
		}
		const nowEffective = effectiveIds.has(r.id);
		if (nowEffective && (doc || !state.effectiveIds.has(r.id))) {
			const e = state.entries.get(r.id)!;
			const d = doc ?? {
				id: r.id,
				docNumber: e.docNumber,
				title: e.title,
				steps: e.steps,
				body: e.text
			};
			if (state.effectiveIds.has(r.id)) state.effective.update(d);
			else state.effective.add(d);
		}
	}
	state.effectiveIds = effectiveIds;
	state.epoch = epoch;
	state.builtAt = now;
	state.nextSwitch = nextSwitchAfter(revs, now);
	state.checkedAt = Date.now();
	return state;
}

/** Builds the indexes from nothing (benchmarks and tests use it to time a cold start). */
export function buildSearchIndex(now: Date = new Date()) {
	return syncSearchIndex(null, now);
}

/** The current index, brought up to date when stale. Concurrent callers share one update. */
async function freshIndex(now: Date): Promise<Built> {
	if (built && !building) {
		const switched = built.nextSwitch && now.getTime() >= built.nextSwitch.getTime();
		let changed = false;
		if (!switched && Date.now() - built.checkedAt >= EPOCH_CHECK_MS) {
			built.checkedAt = Date.now();
			changed = (await readEpoch()) !== built.epoch;
		}
		if (!switched && !changed && !dirty) return built;
	}
	building ??= syncSearchIndex(built, now).finally(() => (building = null));
	dirty = false;
	built = await building;
	return built;
}

let dirty = false;

/** Makes the next search bring the index up to date (called after a publication here). */
export function invalidateSearchIndex() {
	dirty = true;
}

/** Searches effective instructions, or every revision with scope 'all'. */
export async function searchInstructions(
	q: string,
	scope: 'effective' | 'all',
	now: Date = new Date(),
	limit = 20
): Promise<SearchHit[]> {
	const query = q.trim();
	if (!query) return [];
	const idx = await freshIndex(now);
	const results = (scope === 'all' ? idx.all : idx.effective).search(query, { limit: 200 });
	const score = new Map<number, number>();
	for (const group of results as { field: Field; result: number[] }[]) {
		group.result.forEach((id, rank) => {
			score.set(id, (score.get(id) ?? 0) + WEIGHTS[group.field] / (1 + rank * 0.05));
		});
	}
	const terms = queryTerms(query);
	return [...score.entries()]
		.sort((a, b) => b[1] - a[1])
		.slice(0, limit)
		.map(([id]) => idx.entries.get(id)!)
		.map((e) => ({
			docNumber: e.docNumber,
			title: e.title,
			titleHtml: markMatches(e.title, terms),
			letter: e.letter,
			status: e.status,
			url:
				e.status === 'effective'
					? `/instructions/${e.docNumber}`
					: `/instructions/${e.docNumber}/revisions/${e.letter}`,
			snippetHtml: makeSnippet(e.text, terms)
		}));
}
