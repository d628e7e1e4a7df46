/**
 * Certificate PDF benchmark: time per certificate (median and p95 over 50) and a batch of 1,000
 * (total seconds, certificates per second, peak RSS), beside a floor: the same page in pdf-lib's
 * built-in Helvetica with no font files and no subsetting (Latin-only name).
 *
 *   npm run bench:certificates
 */
import {
	renderCertificatePdf,
	renderCertificatePdfWithStandardFonts,
	type CertificatePdfInput
} from '../../src/lib/server/certificates/pdf';

const SAMPLES = 50;
const BATCH = 1000;

function certificate(holderName: string, serial: number): CertificatePdfInput {
	return {
		number: `KBO2-COG-MB-2026-${String(serial).padStart(5, '0')}`,
		holderName,
		employeeNo: `KB-${10000 + serial}`,
		processName: 'COG main bond',
		processCode: 'COG-MB',
		basisRevisions: [
			{ docNumber: 'WI-COG-014', letter: 'C', title: 'COG main bond on BX-7' },
			{ docNumber: 'WI-ACF-002', letter: 'B', title: 'ACF storage and thaw' }
		],
		ruleVersion: 3,
		issuedAt: new Date('2026-11-30T02:15:00Z'),
		expiresAt: new Date('2027-11-30T02:15:00Z'),
		timeZone: 'Asia/Ho_Chi_Minh',
		plantName: 'Kestrel Bay Optronics - Plant 2',
		issuer: { name: 'Daniel Weber', meaning: 'issued', signedAt: new Date('2026-11-30T02:15:00Z') },
		verifyUrl: `https://padbridge.example/verify/tk${serial}Qw7Zr2mVx9PcL4hN8sJ3yB5dF`
	};
}

type Render = (input: CertificatePdfInput) => Promise<Uint8Array>;

const percentile = (sorted: number[], p: number) =>
	sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];

async function measure(render: Render, name: string) {
	for (let i = 0; i < 5; i++) await render(certificate(name, i));
	const times: number[] = [];
	let bytes = 0;
	for (let i = 0; i < SAMPLES; i++) {
		const start = performance.now();
		bytes = (await render(certificate(name, i))).length;
		times.push(performance.now() - start);
	}
	times.sort((a, b) => a - b);
	let peakRssBytes = process.memoryUsage().rss;
	const start = performance.now();
	for (let i = 0; i < BATCH; i++) {
		await render(certificate(name, i));
		if (i % 50 === 0) peakRssBytes = Math.max(peakRssBytes, process.memoryUsage().rss);
	}
	const totalS = (performance.now() - start) / 1000;
	return {
		medianMs: percentile(times, 50),
		p95Ms: percentile(times, 95),
		totalS,
		perS: BATCH / totalS,
		peakRssMb: peakRssBytes / 1024 / 1024,
		sizeKb: bytes / 1024
	};
}

function table(header: string[], rows: string[][]): string {
	const widths = header.map((title, column) =>
		Math.max(title.length, ...rows.map((row) => row[column].length))
	);
	const line = (cells: string[]) =>
		'| ' + cells.map((cell, column) => cell.padEnd(widths[column])).join(' | ') + ' |';
	const rule = '|' + widths.map((width) => '-'.repeat(width + 2)).join('|') + '|';
	return [line(header), rule, ...rows.map(line)].join('\n');
}

const floor = await measure(renderCertificatePdfWithStandardFonts, 'Anna Schmidt');
const cases: [string, Render, string][] = [
	['Noto, subset (Latin name)', renderCertificatePdf, 'Anna Schmidt'],
	['Noto, subset (Vietnamese)', renderCertificatePdf, 'Nguyễn Thị Minh Châu'],
	['Noto, subset (Vietnamese + CJK)', renderCertificatePdf, 'Trần Thị Thu Hà / 王伟']
];
const rows: string[][] = [];
const format = (value: number, digits = 1) => value.toFixed(digits);
const row = (label: string, r: Awaited<ReturnType<typeof measure>>) => [
	label,
	format(r.medianMs),
	format(r.p95Ms),
	format(r.totalS, 2),
	format(r.perS, 0),
	format(r.peakRssMb, 0),
	format(r.sizeKb),
	`${format(r.medianMs / floor.medianMs)}×`
];
rows.push(row('floor: Helvetica, no subsetting', floor));
for (const [label, render, name] of cases) rows.push(row(label, await measure(render, name)));

console.log(
	`Certificate PDF: ${SAMPLES} timed singles, then a batch of ${BATCH} (one process, sequential)\n`
);
console.log(
	table(
		[
			'variant',
			'median ms',
			'p95 ms',
			`${BATCH} total s`,
			'certs/s',
			'peak RSS MB',
			'PDF kB',
			'median / floor'
		],
		rows
	)
);
