// Full-text search over instructions with flexsearch, built from the database on first use and
// rebuilt when this or another instance publishes (search_epoch) or an effective instant passes.
import FlexSearch from 'flexsearch';
import { eq } from 'drizzle-orm';
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

const FIELDS = ['docNumber', 'title', 'steps', 'body'] as const;
const WEIGHTS: Record<(typeof FIELDS)[number], number> = {
	docNumber: 8,
	title: 4,
	steps: 2,
	body: 1
};
/** How often an instance asks the database whether someone else published. */
export const EPOCH_CHECK_MS = 2000;

const newIndex = () =>
	new FlexSearch.Document<Doc>({
		tokenize: 'forward',
		encoder: 'LatinBalance',
		cache: false,
		document: { id: 'id', index: [...FIELDS] }
	});

interface Built {
	effective: InstanceType<typeof FlexSearch.Document<Doc>>;
	all: InstanceType<typeof FlexSearch.Document<Doc>>;
	entries: Map<number, Entry>;
	epoch: number;
	builtAt: Date;
	nextSwitch: Date | null;
	checkedAt: number;
}

let built: Built | null = null;
let building: Promise<Built> | null = null;
const textCache = new Map<string, { text: string; steps: string }>();

async function readEpoch(): Promise<number> {
	const [row] = await db
		.select({ epoch: searchEpoch.epoch })
		.from(searchEpoch)
		.where(eq(searchEpoch.id, 1));
	return row?.epoch ?? 0;
}

async function textOf(source: string, key: string) {
	const hit = textCache.get(key);
	if (hit) return hit;
	const r = await renderInstruction(source);
	const v = { text: r.text, steps: r.steps.join(' \n ') };
	if (textCache.size > 20_000) textCache.clear();
	textCache.set(key, v);
	return v;
}

/** Builds both indexes from the database as of `now`. */
export async function buildSearchIndex(now: Date = new Date()): Promise<Built> {
	const epoch = await readEpoch();
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
			source: revisions.source,
			contentHash: revisions.contentHash
		})
		.from(revisions);
	const byInstruction = new Map<number, typeof revs>();
	for (const r of revs) {
		const l = byInstruction.get(r.instructionId) ?? [];
		l.push(r);
		byInstruction.set(r.instructionId, l);
	}
	const effective = newIndex();
	const all = newIndex();
	const entries = new Map<number, Entry>();
	for (const i of insts) {
		const list = byInstruction.get(i.id) ?? [];
		const eff = pickEffective(list, now, i.withdrawnAt);
		for (const r of list) {
			const { text, steps } = await textOf(r.source, `${r.id}:${r.contentHash}`);
			const status = displayStatus(r, eff?.id ?? null, now);
			const doc = { id: r.id, docNumber: i.docNumber, title: i.title, steps, body: text };
			entries.set(r.id, {
				id: r.id,
				docNumber: i.docNumber,
				title: i.title,
				letter: r.letter,
				status,
				text,
				steps
			});
			all.add(doc);
			if (eff?.id === r.id) effective.add(doc);
		}
	}
	return {
		effective,
		all,
		entries,
		epoch,
		builtAt: now,
		nextSwitch: nextSwitchAfter(revs, now),
		checkedAt: Date.now()
	};
}

/** The current index, rebuilt when stale. Concurrent callers share one rebuild. */
async function freshIndex(now: Date): Promise<Built> {
	if (built) {
		const switched = built.nextSwitch && now.getTime() >= built.nextSwitch.getTime();
		let changed = false;
		if (!switched && Date.now() - built.checkedAt >= EPOCH_CHECK_MS) {
			built.checkedAt = Date.now();
			changed = (await readEpoch()) !== built.epoch;
		}
		if (!switched && !changed) return built;
	}
	building ??= buildSearchIndex(now).finally(() => (building = null));
	built = await building;
	return built;
}

/** Forces the next search to rebuild (called after a publication in this instance). */
export function invalidateSearchIndex() {
	built = null;
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
	for (const group of results as { field: (typeof FIELDS)[number]; result: number[] }[]) {
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
			snippetHtml: makeSnippet(
				e.steps && terms.some((t) => e.steps.toLowerCase().includes(t)) ? e.steps : e.text,
				terms
			)
		}));
}
