import { renderInstruction } from '../../markdown/render';

interface FileRef {
	id: number;
	originalName: string;
}

/** URL of a revision file, served through the access-checked file route. */
export const fileUrl = (docNumber: string, letter: string, fileId: number) =>
	`/instructions/${docNumber}/revisions/${letter}/files/${fileId}`;

const cache = new Map<string, Awaited<ReturnType<typeof renderInstruction>>>();

/** Renders a revision's Markdown with its `asset:` images pointing at the revision's own files. */
export async function renderRevision(
	docNumber: string,
	letter: string,
	source: string,
	files: readonly FileRef[]
) {
	const key = JSON.stringify([docNumber, letter, source, files.map((f) => [f.id, f.originalName])]);
	const hit = cache.get(key);
	if (hit) return hit;
	const rendered = await renderInstruction(source, {
		resolveAsset: (ref) => {
			const f = files.find((x) => x.originalName === ref);
			return f ? fileUrl(docNumber, letter, f.id) : null;
		}
	});
	if (cache.size > 200) cache.delete(cache.keys().next().value!);
	cache.set(key, rendered);
	return rendered;
}
