import type { MarkdownIt, StateBlock, Token } from 'markdown-it';

/** The kinds of safety and information block an instruction can hold. */
export const CALLOUT_KINDS = ['caution', 'warning', 'note'] as const;
export type CalloutKind = (typeof CALLOUT_KINDS)[number];

export interface CalloutMeta {
	kind: CalloutKind;
	title: string;
}

/** What the rule leaves in the markdown-it env for the renderer. */
export interface CalloutEnv {
	/** 0-based line → problem, so that a line probed several times is reported once. */
	calloutWarnings?: Map<number, string>;
	callouts?: WeakMap<Token, CalloutMeta>;
}

const COLON = 0x3a;
const OPENING = /^(:{3,})\s*([A-Za-z]+)\s*(.*)$/;
const CLOSING = /^(:{3,})\s*$/;

function isCalloutKind(word: string): word is CalloutKind {
	return (CALLOUT_KINDS as readonly string[]).includes(word);
}

function lineText(state: StateBlock, line: number): string {
	return state.src.slice(state.bMarks[line] + state.tShift[line], state.eMarks[line]);
}

function warnOnce(state: StateBlock, line: number, message: string) {
	const env = state.env as CalloutEnv;
	env.calloutWarnings ??= new Map();
	if (!env.calloutWarnings.has(line)) env.calloutWarnings.set(line, message);
}

/**
 * Block rule for
 *
 *     :::caution Hot head
 *     Markdown content …
 *     :::
 *
 * The opening line names the kind (caution, warning or note) and an optional title; a line of
 * colons alone closes the block. Blocks may nest; each closing line closes the innermost one.
 */
function calloutRule(state: StateBlock, startLine: number, endLine: number, silent: boolean) {
	if (state.sCount[startLine] - state.blkIndent >= 4) return false;
	const start = state.bMarks[startLine] + state.tShift[startLine];
	if (state.src.charCodeAt(start) !== COLON) return false;
	const opening = OPENING.exec(lineText(state, startLine));
	if (!opening) return false;
	const kind = opening[2].toLowerCase();
	if (!isCalloutKind(kind)) {
		warnOnce(
			state,
			startLine,
			`Line ${startLine + 1}: ":::${opening[2]}" is not a block type; use :::caution, :::warning or :::note`
		);
		return false;
	}
	if (silent) return true;

	let depth = 1;
	let nextLine = startLine;
	let closed = false;
	while (++nextLine < endLine) {
		if (state.sCount[nextLine] < state.blkIndent && state.bMarks[nextLine] < state.eMarks[nextLine])
			break;
		if (state.sCount[nextLine] - state.blkIndent >= 4) continue;
		const text = lineText(state, nextLine);
		if (CLOSING.test(text)) {
			if (--depth === 0) {
				closed = true;
				break;
			}
			continue;
		}
		const inner = OPENING.exec(text);
		if (inner && isCalloutKind(inner[2].toLowerCase())) depth++;
	}
	if (!closed) {
		warnOnce(
			state,
			startLine,
			`Line ${startLine + 1}: the :::${kind} block has no closing ":::" line; it runs to the end`
		);
	}

	const oldParent = state.parentType;
	const oldLineMax = state.lineMax;
	state.parentType = 'callout' as typeof state.parentType;
	state.lineMax = nextLine;

	const open = state.push('callout_open', 'div', 1);
	open.block = true;
	open.markup = opening[1];
	open.map = [startLine, nextLine];
	const env = state.env as CalloutEnv;
	env.callouts ??= new WeakMap();
	env.callouts.set(open, { kind, title: opening[3].trim() });

	state.md.block.tokenize(state, startLine + 1, nextLine);

	const close = state.push('callout_close', 'div', -1);
	close.block = true;
	close.markup = opening[1];

	state.parentType = oldParent;
	state.lineMax = oldLineMax;
	state.line = nextLine + (closed ? 1 : 0);
	return true;
}

export function calloutPlugin(md: MarkdownIt) {
	md.block.ruler.before('fence', 'callout', calloutRule, {
		alt: ['paragraph', 'reference', 'blockquote', 'list']
	});
}
