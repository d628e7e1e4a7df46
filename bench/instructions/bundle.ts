// JavaScript the operator's instruction page loads, in gzip bytes, from the built client.
// Without BENCH_URL it reads the build's manifest (route → nodes → static imports). With
// BENCH_URL (a running `npm start`) it signs in as the demo operator and reads the page's
// modulepreload links, which is what a browser actually fetches.
// Usage: npm run build && npm run bench:instructions:bundle   [BENCH_URL=http://127.0.0.1:3000]
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';

const root = join(import.meta.dirname, '../..');
const clientDir = join(root, '.svelte-kit/output/client');
const manifestFile = join(clientDir, '.vite/manifest.json');
const ROUTE = '/(app)/instructions/[doc=docNumber]';
/** Budget for the operator page's initial JavaScript (gzip). A whole shiki with grammars is MBs. */
const BUDGET_GZIP = 120 * 1024;

type Chunk = { file: string; imports?: string[]; dynamicImports?: string[]; isEntry?: boolean };

if (!existsSync(manifestFile)) {
	console.error('No build found: run `npm run build` first.');
	process.exit(1);
}
const manifest: Record<string, Chunk> = JSON.parse(readFileSync(manifestFile, 'utf8'));

function nodesOfRoute(): number[] {
	const app = readFileSync(join(root, '.svelte-kit/generated/client-optimized/app.js'), 'utf8');
	const line = app.split('\n').find((l) => l.includes(`"${ROUTE}":`));
	const m = line && /\[~?(\d+),\[([\d,~]*)\]/.exec(line);
	if (!m) throw new Error(`route ${ROUTE} not found in the client build`);
	const layouts = m[2]
		.split(',')
		.filter(Boolean)
		.map((x) => Number(x.replace('~', '')));
	return [0, ...layouts, Number(m[1])];
}

function staticClosure(keys: string[]): Set<string> {
	const seen = new Set<string>();
	const walk = (k: string) => {
		if (seen.has(k) || !manifest[k]) return;
		seen.add(k);
		for (const i of manifest[k].imports ?? []) walk(i);
	};
	keys.forEach(walk);
	return seen;
}

async function filesFromServer(base: string): Promise<string[]> {
	const form = new URLSearchParams({ badge: 'KB-10421', pin: '204816', redirectTo: '/' });
	const res = await fetch(`${base}/signin?/badge`, {
		method: 'POST',
		body: form,
		headers: { origin: base, 'content-type': 'application/x-www-form-urlencoded' },
		redirect: 'manual'
	});
	const cookie = res.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.join('; ');
	const html = await (
		await fetch(`${base}/instructions/WI-COG-004`, { headers: { cookie } })
	).text();
	const files = new Set<string>();
	for (const m of html.matchAll(/<link[^>]+rel="modulepreload"[^>]+href="([^"]+)"/g))
		files.add(m[1]);
	for (const m of html.matchAll(/import\("([^"]+\.js)"\)/g)) files.add(m[1]);
	return [...files].map((f) => f.replace(/^(\.\.?\/)+/, '').replace(/^\//, ''));
}

const sizeOf = (file: string) => {
	const bytes = readFileSync(join(clientDir, file));
	return {
		raw: bytes.byteLength,
		gzip: gzipSync(bytes, { level: 9 }).byteLength,
		text: bytes.toString('utf8')
	};
};

const base = process.env.BENCH_URL;
let files: string[];
let source: string;
if (base) {
	files = await filesFromServer(base);
	source = `modulepreload links of ${base}/instructions/WI-COG-004 (signed in as the demo operator)`;
} else {
	const entryKeys = Object.keys(manifest).filter(
		(k) => k.endsWith('client/entry.js') || k.endsWith('client-optimized/app.js')
	);
	const nodeKeys = nodesOfRoute().map(
		(n) => `.svelte-kit/generated/client-optimized/nodes/${n}.js`
	);
	files = [...staticClosure([...entryKeys, ...nodeKeys])].map((k) => manifest[k].file);
	source = `build manifest, route ${ROUTE} (nodes ${nodesOfRoute().join(', ')}) and the client entry`;
}

const rows = files
	.filter((f) => f.endsWith('.js'))
	.map((f) => ({ file: f, ...sizeOf(f) }))
	.sort((a, b) => b.gzip - a.gzip);
const total = rows.reduce((s, r) => ({ raw: s.raw + r.raw, gzip: s.gzip + r.gzip }), {
	raw: 0,
	gzip: 0
});
const shikiChunks = rows.filter((r) => /shiki|oniguruma|vscode-textmate|tm-grammar/i.test(r.text));
const allJs = Object.values(manifest)
	.map((c) => c.file)
	.filter((f) => f.endsWith('.js'));
const lazyShiki = allJs.filter((f) =>
	/shiki|oniguruma/i.test(readFileSync(join(clientDir, f), 'utf8'))
);

const kb = (n: number) => `${(n / 1024).toFixed(1)} kB`;
console.log(`\nJavaScript for the operator's instruction page\nsource: ${source}\n`);
console.log('| file | raw | gzip |');
console.log('|---|---:|---:|');
for (const r of rows) console.log(`| ${r.file} | ${kb(r.raw)} | ${kb(r.gzip)} |`);
console.log(`| **total (${rows.length} files)** | ${kb(total.raw)} | **${kb(total.gzip)}** |`);
console.log(
	`\nbudget (gzip): ${kb(BUDGET_GZIP)} → ${total.gzip <= BUDGET_GZIP ? 'within budget' : 'OVER BUDGET'}`
);
console.log(
	`shiki in the page's initial JavaScript: ${shikiChunks.length ? shikiChunks.map((c) => c.file).join(', ') : 'none'}`
);
console.log(
	`client chunks anywhere in the build that mention shiki (lazy or not): ${lazyShiki.length}`
);
if (total.gzip > BUDGET_GZIP || shikiChunks.some((c) => c.gzip > 200 * 1024)) process.exitCode = 1;
