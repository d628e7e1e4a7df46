import { renderInstruction } from '../../markdown/render';

/** Front matter every page in content/help carries. */
export interface HelpPageMeta {
	title: string;
	summary: string;
	/** Who the page is mainly for, in words ("Trainers and engineers"). */
	audience: string;
	order: number;
}

export interface HelpPageSummary extends HelpPageMeta {
	slug: string;
}

export interface HelpExample {
	source: string;
	html: string;
}

const pageMeta = import.meta.glob<HelpPageMeta>('/content/help/*.md', {
	eager: true,
	import: 'metadata'
});

// Sample instruction sources shown beside their rendering: content/help/examples/<page>/<name>.md
const exampleSources = import.meta.glob<string>('/content/help/examples/*/*.md', {
	eager: true,
	query: '?raw',
	import: 'default'
});

/** Pictures the examples may use, served from static/help-media. */
const HELP_MEDIA = new Set(['indentation-even.png', 'indentation-weak-edge.png']);

const slugOf = (path: string) => path.slice(path.lastIndexOf('/') + 1, -'.md'.length);

export function listHelpPages(): HelpPageSummary[] {
	return Object.entries(pageMeta)
		.map(([path, meta]) => ({ ...meta, slug: slugOf(path) }))
		.sort((a, b) => a.order - b.order || a.title.localeCompare(b.title));
}

export function findHelpPage(slug: string): HelpPageSummary | null {
	return listHelpPages().find((page) => page.slug === slug) ?? null;
}

const rendered = new Map<string, Promise<Record<string, HelpExample>>>();

async function renderExamples(slug: string): Promise<Record<string, HelpExample>> {
	const prefix = `/content/help/examples/${slug}/`;
	const examples: Record<string, HelpExample> = {};
	for (const [path, source] of Object.entries(exampleSources)) {
		if (!path.startsWith(prefix)) continue;
		const result = await renderInstruction(source, {
			resolveAsset: (ref) => (HELP_MEDIA.has(ref) ? `/help-media/${ref}` : null)
		});
		// The examples ship with the app, so a warning here is a mistake in them, not author input.
		if (result.warnings.length) {
			throw new Error(`Help example ${path}: ${result.warnings.join('; ')}`);
		}
		examples[slugOf(path)] = { source, html: result.html };
	}
	return examples;
}

/** The rendered sample instructions of one help page, by name; rendered once per process. */
export function getHelpExamples(slug: string): Promise<Record<string, HelpExample>> {
	let examples = rendered.get(slug);
	if (!examples) {
		examples = renderExamples(slug);
		examples.catch(() => rendered.delete(slug));
		rendered.set(slug, examples);
	}
	return examples;
}
