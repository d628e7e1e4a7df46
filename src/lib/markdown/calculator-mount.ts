import { mount, unmount, type Component } from 'svelte';

export interface CalculatorBlockProps {
	id: string;
	presets: Record<string, string>;
}

type BlockModule = { default: Component<CalculatorBlockProps> };

// A glob rather than a plain import(): the live calculator component belongs to the calculators
// work, and a glob that matches no file still builds, so the block's plain fallback simply stays.
const modules = import.meta.glob<BlockModule>('../components/calculators/CalculatorBlock.svelte');

let pending: Promise<Component<CalculatorBlockProps> | null> | null = null;

function loadCalculatorBlock(): Promise<Component<CalculatorBlockProps> | null> {
	const load = Object.values(modules)[0];
	if (!load) return Promise.resolve(null);
	pending ??= load().then(
		(module) => module.default,
		(error: unknown) => {
			// A chunk that fails to load (offline terminal, new deploy) leaves the fallback in place.
			console.warn('The calculator block could not be loaded; showing the plain presets.', error);
			pending = null;
			return null;
		}
	);
	return pending;
}

/** The id and presets a rendered `.calc-block` carries, or null when its data is not usable. */
export function readCalcBlock(element: HTMLElement): CalculatorBlockProps | null {
	const id = element.dataset.calc;
	if (!id) return null;
	let parsed: unknown;
	try {
		parsed = JSON.parse(element.dataset.presets ?? '{}');
	} catch {
		return null;
	}
	if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) return null;
	const presets: Record<string, string> = {};
	for (const [key, value] of Object.entries(parsed)) {
		if (typeof value === 'string') presets[key] = value;
	}
	return { id, presets };
}

/**
 * Mounts the live calculator into every `.calc-block` under `root`, keeping each block's fallback
 * (out of sight on screen, shown on paper). Returns the function that unmounts them again.
 */
export function mountCalculatorBlocks(root: HTMLElement): () => void {
	const blocks = [...root.querySelectorAll<HTMLElement>('.calc-block')];
	if (blocks.length === 0) return () => {};
	let cancelled = false;
	const undo: (() => void)[] = [];

	void loadCalculatorBlock().then((Block) => {
		if (cancelled || !Block) return;
		for (const block of blocks) {
			const props = readCalcBlock(block);
			const fallback = block.querySelector<HTMLElement>('.calc-fallback');
			if (!props) continue;
			const target = document.createElement('div');
			target.className = 'calc-live';
			block.append(target);
			const instance = mount(Block, { target, props });
			fallback?.classList.add('is-replaced');
			undo.push(() => {
				void unmount(instance);
				target.remove();
				fallback?.classList.remove('is-replaced');
			});
		}
	});

	return () => {
		cancelled = true;
		for (const step of undo) step();
	};
}
