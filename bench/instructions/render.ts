/**
 * Instruction render benchmark: server render time of one long work instruction (about 5,000
 * words, 20 images, 5 calculator blocks, tables, code blocks, cautions) through the full pipeline
 * (markdown-it + rules, shiki, sanitize-html), cold and warm, beside a floor measured in the same
 * run: plain markdown-it on the same source, with no sanitising and no highlighting.
 *
 *   npm run bench:instructions:render
 */
import MarkdownIt from 'markdown-it';
import { loadavg } from 'node:os';

const WARM_RUNS = 30;
const TARGET_WORDS = 5000;

// ---------------------------------------------------------------- the generated instruction

// Park and Miller's minimal standard generator: the same instruction on every run.
let seed = 20260;
const random = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
const pick = <T>(items: readonly T[]): T => items[Math.floor(random() * items.length)];

const WORDS = (
	'the head buffer sheet film reel bump pad glass flex panel stage tool pressure force time ' +
	'temperature operator check record line lead inspection indentation mark particle recipe ' +
	'station bonder alignment camera fiducial clean wipe IPA tweezers glove strap tray cure ' +
	'before after until while each every second minute gauge value limit drift reject accept'
).split(' ');
const VERBS = ['Check', 'Wipe', 'Load', 'Press', 'Record', 'Inspect', 'Align', 'Remove', 'Place'];

function sentence(min: number, max: number): string {
	const n = min + Math.floor(random() * (max - min + 1));
	const words = Array.from({ length: n }, () => pick(WORDS));
	words[0] = words[0][0].toUpperCase() + words[0].slice(1);
	if (random() < 0.2) words[Math.floor(n / 2)] = `**${words[Math.floor(n / 2)]}**`;
	if (random() < 0.15) words[n - 1] = `\`${185 + Math.floor(random() * 20)} °C\``;
	return `${words.join(' ')}.`;
}

const paragraph = () => Array.from({ length: 4 }, () => sentence(10, 18)).join(' ');

const CALCS = [
	'```calc bond-force\nbasis: bump\nbumpCount: 1280\nbumpWidthUm: 18\nbumpLengthUm: 90\npressureMPa: 70\n```',
	'```calc particle-capture\ndensityPerMm2: 32000\nbumpWidthUm: 18\nbumpLengthUm: 90\ncaptureRatio: 0.3\nminParticles: 3\nbumpCount: 1280\n```',
	'```calc cure-degree\nmodel: nth-order\npreExponentialPerS: 2.5e8\nactivationEnergyKJPerMol: 80\norder: 1\nsegments: [{"startC":25,"endC":190,"durationS":2},{"startC":190,"endC":190,"durationS":10}]\n```',
	'```calc head-offset\npoints: [{"setpointC":200,"measuredC":167.5},{"setpointC":220,"measuredC":183.8},{"setpointC":240,"measuredC":200.6}]\ntargetC: 180\n```',
	'```calc units\nquantity: pressure\nvalue: 800\nfrom: kgf/cm²\nto: MPa\n```'
];

const CODE = [
	'```ini\n; recipe export\n[main_bond]\nhead_temp_c = 185\nforce_n = 72\ntime_s = 8.0\n[pre_bond]\nhead_temp_c = 80\nforce_n = 10\n```',
	'```yaml\nrecipe: FOG-7IN-B\nmain_bond:\n  head_temp_c: 185\n  force_n: 72\n  time_s: 8.0 # validated\n```',
	'```json\n{ "recipe": "FOG-7IN-B", "main_bond": { "head_temp_c": 185, "force_n": 72, "time_s": 8.0 } }\n```',
	'```csv\nstep,temp_c,force_n,time_s\npre-bond,80,10,1.0\nmain bond,185,72,8.0\n```',
	'```shell\n# copy the recipe export to the share\ncp /mnt/bonder/FOG-7IN-B.ini "$RECIPES/L2-FOG-03/"\n```'
];

const TABLE =
	'| Parameter | Recipe value | Allowed drift |\n| :-- | --: | --: |\n| Head temperature | 185 °C | ± 3 °C |\n| Bond force | 72 N | ± 2 N |\n| Bond time | 8 s | ± 0.2 s |\n| Buffer sheet | PTFE 50 µm | — |';

const CALLOUTS = [
	':::caution Hot head\nThe head runs at up to 300 °C. Let it cool below 50 °C before you touch it.\n:::',
	':::warning Pinch point\nNever reach under a closing head. Use the jog key or the emergency stop.\n:::',
	':::note\nThe validated recipe on the bonder governs every value in this section.\n:::'
];

function buildInstruction(): { source: string; assets: string[] } {
	const blocks: string[] = [];
	const assets: string[] = [];
	let section = 0;
	let image = 0;
	// Words as search sees them: code and calculator blocks and Markdown punctuation left out.
	const textWords = () =>
		blocks
			.filter((block) => !block.startsWith('```'))
			.join(' ')
			.replace(/\(asset:[^)]*\)|[#*`|:![\]()-]+/g, ' ')
			.split(/\s+/)
			.filter(Boolean).length;
	// A little over the target, as search counts a few words fewer (units split off, for one).
	while (textWords() < TARGET_WORDS * 1.04 || image < 20) {
		section++;
		blocks.push(`## Section ${section}: ${pick(VERBS)} the ${pick(WORDS)}`);
		blocks.push(paragraph());
		if (section % 3 === 1) blocks.push(CALLOUTS[section % CALLOUTS.length]);
		const steps = Array.from(
			{ length: 6 },
			(_, i) => `${i + 1}. ${pick(VERBS)} ${sentence(8, 16).toLowerCase()}`
		);
		blocks.push(steps.join('\n'));
		if (image < 20) {
			const name = `photo-${++image}.jpg`;
			assets.push(name);
			blocks.push(`![Indentation marks, sample ${image}](asset:${name} "${sentence(5, 9)}")`);
		}
		if (section % 4 === 0) blocks.push(TABLE);
		if (section % 4 === 2) blocks.push(CODE[((section / 4) % CODE.length) | 0]);
		if (section % 4 === 3 && section / 4 < CALCS.length)
			blocks.push(CALCS[Math.floor(section / 4)]);
		blocks.push(paragraph());
	}
	// Make sure every code language and all five calculators appear, however short the text ran.
	for (const block of [...CODE, ...CALCS]) if (!blocks.includes(block)) blocks.push(block);
	return { source: blocks.join('\n\n') + '\n', assets };
}

// ---------------------------------------------------------------- timing

function quantile(values: number[], q: number): number {
	const sorted = [...values].sort((a, b) => a - b);
	const position = (sorted.length - 1) * q;
	const low = Math.floor(position);
	const high = Math.ceil(position);
	return sorted[low] + (sorted[high] - sorted[low]) * (position - low);
}

/**
 * Times each job `runs` times, the jobs taking turns, so that a busy machine slows all of them
 * alike and the ratios stay meaningful.
 */
async function timeInTurns(
	jobs: (() => unknown | Promise<unknown>)[],
	runs: number
): Promise<number[][]> {
	const times = jobs.map(() => [] as number[]);
	for (let i = 0; i < runs; i++) {
		for (const [j, job] of jobs.entries()) {
			const start = performance.now();
			await job();
			times[j].push(performance.now() - start);
		}
	}
	return times;
}

function table(header: string[], rows: string[][]): string {
	const widths = header.map((title, column) =>
		Math.max(title.length, ...rows.map((row) => row[column].length))
	);
	const line = (cells: string[]) =>
		'| ' +
		cells
			.map((cell, column) =>
				column === 0 ? cell.padEnd(widths[column]) : cell.padStart(widths[column])
			)
			.join(' | ') +
		' |';
	const rule = '|' + widths.map((width) => '-'.repeat(width + 2)).join('|') + '|';
	return [line(header), rule, ...rows.map(line)].join('\n');
}

const ms = (value: number) => `${value.toFixed(2)} ms`;

// ---------------------------------------------------------------- run

const { source, assets } = buildInstruction();
const urls = new Map(assets.map((name) => [name, `/files/bench/${name}`]));
const resolveAsset = (ref: string) => urls.get(ref) ?? null;

// Cold: the first render in a fresh process, including loading the modules and starting shiki.
const importStart = performance.now();
const { renderInstruction } = await import('../../src/lib/markdown/render');
const { sanitizeInstructionHtml } = await import('../../src/lib/markdown/sanitize');
const importMs = performance.now() - importStart;
const coldStart = performance.now();
const first = await renderInstruction(source, { resolveAsset });
const coldMs = performance.now() - coldStart;

if (first.warnings.length)
	throw new Error(`the generated instruction has warnings: ${first.warnings[0]}`);
const facts = {
	words: first.text.split(/\s+/).filter(Boolean).length,
	images: first.assets.length,
	calculators: first.calculators.length,
	tables: (first.html.match(/<table>/g) ?? []).length,
	codeBlocks: (first.html.match(/<pre class="shiki/g) ?? []).length,
	callouts: (first.html.match(/class="callout /g) ?? []).length,
	steps: first.steps.length
};

// The floor: markdown-it alone, same source, nothing else.
const plain = new MarkdownIt('default', { html: false });
const floorColdStart = performance.now();
const floorHtml = plain.render(source);
const floorColdMs = performance.now() - floorColdStart;

// Warm runs; sanitize-html alone on the finished HTML shows where part of the difference goes.
const [warm, floor, sanitize] = await timeInTurns(
	[
		() => renderInstruction(source, { resolveAsset }),
		() => plain.render(source),
		() => sanitizeInstructionHtml(first.html)
	],
	WARM_RUNS
);

const median = (values: number[]) => quantile(values, 0.5);
const p95 = (values: number[]) => quantile(values, 0.95);

console.log('\nInstruction render benchmark');
console.log(
	`source: ${(source.length / 1024).toFixed(1)} KiB Markdown, ${facts.words} words, ${facts.images} images, ` +
		`${facts.calculators} calculator blocks, ${facts.tables} tables, ${facts.codeBlocks} code blocks, ` +
		`${facts.callouts} caution/warning/note blocks, ${facts.steps} steps`
);
console.log(
	`output: ${(first.html.length / 1024).toFixed(1)} KiB HTML (floor: ${(floorHtml.length / 1024).toFixed(1)} KiB); ` +
		`${WARM_RUNS} warm runs each, taking turns; Node ${process.version}; ` +
		`load average ${loadavg()[0].toFixed(1)} on this machine\n`
);
console.log(
	table(
		['pipeline', 'cold (first)', 'warm median', 'warm p95', 'median ÷ floor'],
		[
			[
				'renderInstruction (full)',
				ms(coldMs),
				ms(median(warm)),
				ms(p95(warm)),
				`${(median(warm) / median(floor)).toFixed(1)} ×`
			],
			['floor: markdown-it only', ms(floorColdMs), ms(median(floor)), ms(p95(floor)), '1.0 ×'],
			[
				'part: sanitize-html alone',
				'—',
				ms(median(sanitize)),
				ms(p95(sanitize)),
				`${(median(sanitize) / median(floor)).toFixed(1)} ×`
			]
		]
	)
);
console.log(`\nmodule import before the cold render: ${ms(importMs)} (not included in "cold")`);
