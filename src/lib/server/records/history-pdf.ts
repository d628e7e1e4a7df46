// A person's training history as a PDF: A4 portrait, the same header on every page (plant, person,
// employee number), a section per record type as a table whose rows wrap and break across
// pages (the column header repeats), and a footer with the generated-on stamp and "page x of y".
// Fonts as on the certificate (../pdf/fonts.ts): subset per document, CJK names fall back to
// Noto Sans SC run by run.
import { PDFDocument, type PDFPage } from 'pdf-lib';
import { formatLocal } from '../../time';
import { CERTIFICATE_STATUS_LABELS } from '../../training/vocabulary';
import { PdfFonts, type Weight } from '../pdf/fonts';
import { tokenRgb, type Token } from '../pdf/colors';
import { CERTIFICATE_EVENT_LABELS } from '../../records/history-vocabulary';
import type { TrainingHistory } from './history';

export const PAGE_W = 595.28;
export const PAGE_H = 841.89;
const MARGIN = 40;
const CONTENT_W = PAGE_W - 2 * MARGIN;
const BODY_TOP = PAGE_H - 146;
const BODY_BOTTOM = 56;
const NAME_SIZE = 18;
const NAME_BASELINE = PAGE_H - 104;
/** Where the person's name sits on every page, in points from the top-left (for read-back tests). */
export const NAME_BOX_PT = {
	x: MARGIN - 6,
	y: PAGE_H - NAME_BASELINE - 22,
	width: CONTENT_W + 12,
	height: 30
};

const CELL_SIZE = 8.5;
const LINE_H = 11;
const PAD_X = 4;
const PAD_Y = 3.5;
const ELLIPSIS = '…';

/** A table cell; lines break at "\n". `head` prints the first line bold (the record's identifier). */
type Cell = string | { text: string; weight?: Weight; color?: Token; head?: boolean };
interface Column {
	label: string;
	/** Share of the content width. */
	share: number;
}
interface Section {
	title: string;
	columns: Column[];
	rows: Cell[][];
	empty: string;
}

export interface HistoryPdfOptions {
	/** Who asked for the document (the generated-on stamp). */
	generatedBy: string;
}

const head = (text: string): Cell => ({ text, head: true });

/** The cell's paragraphs, each with the weight it prints in. */
function paragraphs(c: Cell): [string, Weight][] {
	const cell = typeof c === 'string' ? { text: c } : c;
	return cell.text
		.split('\n')
		.map((p, i) => [p, cell.head && i === 0 ? 'bold' : (cell.weight ?? 'regular')]);
}

/** The document's sections as text, before any layout: every string the PDF will print. */
function sectionsOf(h: TrainingHistory): Section[] {
	const tz = h.timeZone;
	const at = (d: Date | null | undefined) => (d ? formatLocal(d, tz, false) : '—');
	const signed = (name: string, when: Date | null) => (when ? `${name}\n${at(when)}` : '—');
	const yesNo = (passed: boolean | null, pass = 'Passed', fail = 'Failed') =>
		passed == null
			? { text: '—' }
			: passed
				? { text: pass, weight: 'bold' as const, color: 'bond-700' as const }
				: { text: fail, weight: 'bold' as const, color: 'open-700' as const };

	return [
		{
			title: 'Assignments',
			columns: [
				{ label: 'Process', share: 0.24 },
				{ label: 'Assigned as', share: 0.14 },
				{ label: 'Due (plant date)', share: 0.13 },
				{ label: 'Assigned', share: 0.23 },
				{ label: 'Closed', share: 0.26 }
			],
			rows: h.assignments.map((a) => [
				head(`${a.processCode}\n${a.processName}`),
				a.scope === 'person'
					? 'person'
					: `${a.scope} ${a.scope === 'line' ? (a.lineCode ?? '') : (a.stationCode ?? '')}`.trim(),
				a.dueOn ?? '—',
				`${at(a.assignedAt)}\nby ${a.assignedBy}`,
				a.closedAt ? `${at(a.closedAt)}${a.closedReason ? `\n${a.closedReason}` : ''}` : 'open'
			]),
			empty: 'No assignments recorded.'
		},
		{
			title: 'Acknowledgements',
			columns: [
				{ label: 'Instruction', share: 0.5 },
				{ label: 'Revision', share: 0.12 },
				{ label: 'Acknowledged (plant time)', share: 0.24 },
				{ label: 'Signed with', share: 0.14 }
			],
			rows: h.acknowledgements.map((a) => [
				head(`${a.docNumber}\n${a.title}`),
				`rev ${a.revision}`,
				at(a.acknowledgedAt),
				a.method === 'pin' ? 'PIN' : 'password'
			]),
			empty: 'No acknowledgements recorded.'
		},
		{
			title: 'Knowledge-check attempts',
			columns: [
				{ label: 'Check', share: 0.3 },
				{ label: 'Version', share: 0.09 },
				{ label: 'Started', share: 0.16 },
				{ label: 'Submitted', share: 0.16 },
				{ label: 'Score / pass mark', share: 0.15 },
				{ label: 'Result', share: 0.14 }
			],
			rows: h.attempts.map((a) => [
				head(`${a.checkCode} (${a.processCode})\n${a.checkTitle}`),
				`v${a.checkVersion}`,
				at(a.startedAt),
				a.submittedAt ? at(a.submittedAt) : a.state === 'timed_out' ? 'timed out' : 'not submitted',
				a.scorePct == null ? `— / ${a.passMarkPct} %` : `${a.scorePct} % / ${a.passMarkPct} %`,
				a.state === 'open' ? { text: 'open' } : yesNo(a.passed)
			]),
			empty: 'No knowledge-check attempts recorded.'
		},
		{
			title: 'Practical sign-offs',
			columns: [
				{ label: 'Checklist', share: 0.24 },
				{ label: 'Against', share: 0.17 },
				{ label: 'Observed and signed by trainer', share: 0.22 },
				{ label: 'Countersigned by operator', share: 0.22 },
				{ label: 'Result', share: 0.15 }
			],
			rows: h.signoffs.map((s) => [
				head(`${s.processCode}\n${s.checklistTitle}`),
				`${s.docNumber} rev ${s.revision}${s.stationCode ? `\nat ${s.stationCode}` : ''}`,
				signed(s.trainer.name, s.trainer.signedAt),
				signed(s.operator.name, s.operator.signedAt),
				s.state === 'draft'
					? { text: 'in progress' }
					: s.state === 'trainer_signed'
						? { text: 'awaiting countersign' }
						: yesNo(s.passed)
			]),
			empty: 'No practical sign-offs recorded.'
		},
		{
			title: 'Certificates',
			columns: [
				{ label: 'Certificate', share: 0.24 },
				{ label: 'Issued / expires', share: 0.17 },
				{ label: 'Status', share: 0.14 },
				{ label: 'Basis and state changes', share: 0.45 }
			],
			rows: h.certificates.map((c) => {
				const basis = c.basis.map((b) =>
					b.docNumber ? `${b.kind}: ${b.docNumber} rev ${b.revision}` : `${b.kind} #${b.refId}`
				);
				const events = c.events.map(
					(e) =>
						`${CERTIFICATE_EVENT_LABELS[e.kind]} ${at(e.at)} by ${e.by}${e.reason ? ` — ${e.reason}` : ''}`
				);
				return [
					head(
						`${c.number}\n${c.processCode} · ${c.processName}\nrule v${c.ruleVersion}${c.previousNumber ? `\nrenews ${c.previousNumber}` : ''}`
					),
					`${at(c.issuedAt)}\n${at(c.expiresAt)}`,
					{
						text: CERTIFICATE_STATUS_LABELS[c.status],
						weight: 'bold',
						color:
							c.status === 'valid'
								? 'bond-700'
								: c.status === 'expiring' || c.status === 'retraining_due'
									? 'film-700'
									: c.status === 'superseded'
										? 'panel-500'
										: 'open-700'
					},
					[
						`Signed: ${c.signerName} (${c.signerRole})`,
						basis.length ? `Basis: ${basis.join('; ')}` : 'Basis: —',
						...events
					].join('\n')
				];
			}),
			empty: 'No certificates recorded.'
		}
	];
}

function personLine(h: TrainingHistory): string {
	const p = h.person;
	const parts = [`Employee no. ${p.employeeNo}`];
	if (p.line) parts.push(`Line ${p.line.code}`);
	if (p.shift) parts.push(`Shift ${p.shift.code}`);
	parts.push(
		p.employmentType === 'agency'
			? `Agency${p.agencyName ? ` (${p.agencyName})` : ''}${p.contractEndsOn ? `, contract to ${p.contractEndsOn}` : ''}`
			: p.employmentType === 'contractor'
				? 'Contractor'
				: 'Employee'
	);
	parts.push(
		p.active
			? 'Active'
			: `Inactive${p.employmentEndedOn ? `, employment ended ${p.employmentEndedOn}` : ''}`
	);
	return parts.join(' · ');
}

/** Splits text into lines no wider than `width` (words first, characters when a word is too long). */
function wrap(
	fonts: PdfFonts,
	text: string,
	width: number,
	size: number,
	weight: Weight
): string[] {
	const out: string[] = [];
	const fits = (s: string) => fonts.width(s, size, weight) <= width;
	for (const paragraph of text.split('\n')) {
		let line = '';
		for (const token of paragraph.split(/(?<=\s)/)) {
			if (fits(line + token.trimEnd())) {
				line += token;
				continue;
			}
			if (line.trim()) out.push(line.trimEnd());
			line = '';
			// A word wider than the column (a long number, a CJK name): break it by characters.
			let piece = '';
			for (const ch of token) {
				if (piece && !fits(piece + ch)) {
					out.push(piece);
					piece = '';
				}
				piece += ch;
			}
			line = piece;
		}
		out.push(line.trimEnd());
	}
	return out;
}

class Writer {
	pages: PDFPage[] = [];
	private page!: PDFPage;
	y = 0;

	constructor(
		private doc: PDFDocument,
		private fonts: PdfFonts,
		private h: TrainingHistory,
		private opts: HistoryPdfOptions
	) {}

	text(
		s: string,
		x: number,
		y: number,
		size: number,
		weight: Weight,
		color: Token,
		maxWidth?: number
	) {
		let at = size;
		if (maxWidth) while (at > 6 && this.fonts.width(s, at, weight) > maxWidth) at -= 0.5;
		this.fonts.draw(this.page, s, { x, y, size: at, weight, color: tokenRgb(color) });
	}

	newPage() {
		this.page = this.doc.addPage([PAGE_W, PAGE_H]);
		this.pages.push(this.page);
		const page = this.page;
		page.drawRectangle({
			x: MARGIN,
			y: PAGE_H - 58,
			width: CONTENT_W,
			height: 30,
			color: tokenRgb('panel-900')
		});
		page.drawRectangle({
			x: MARGIN,
			y: PAGE_H - 62,
			width: CONTENT_W,
			height: 4,
			color: tokenRgb('film-500')
		});
		this.text('PADBRIDGE', MARGIN + 10, PAGE_H - 48, 11, 'bold', 'film-100');
		this.text(
			this.h.plant.name,
			MARGIN + 100,
			PAGE_H - 48,
			10,
			'regular',
			'panel-50',
			CONTENT_W - 110
		);
		this.text('Training history', MARGIN, PAGE_H - 78, 9, 'bold', 'film-700');
		this.text(
			this.h.person.displayName,
			MARGIN,
			NAME_BASELINE,
			NAME_SIZE,
			'bold',
			'panel-900',
			CONTENT_W
		);
		this.text(personLine(this.h), MARGIN, PAGE_H - 122, 9, 'regular', 'panel-700', CONTENT_W);
		page.drawRectangle({
			x: MARGIN,
			y: PAGE_H - 132,
			width: CONTENT_W,
			height: 0.75,
			color: tokenRgb('panel-200')
		});
		this.y = BODY_TOP;
	}

	/** Ensures `height` points are free below the cursor, starting a new page otherwise. */
	room(height: number): boolean {
		if (this.y - height >= BODY_BOTTOM) return false;
		this.newPage();
		return true;
	}

	heading(title: string, count: number | null, continued = false) {
		this.room(40);
		const label = `${title}${count == null ? '' : ` (${count})`}${continued ? ' (continued)' : ''}`;
		this.text(label, MARGIN, this.y - 12, 12, 'bold', 'panel-900');
		this.y -= 20;
	}

	private columnX(columns: Column[]) {
		const xs: number[] = [];
		let x = MARGIN;
		for (const c of columns) {
			xs.push(x);
			x += c.share * CONTENT_W;
		}
		return xs;
	}

	tableHeader(columns: Column[]) {
		const xs = this.columnX(columns);
		const lines = columns.map((c) =>
			wrap(this.fonts, c.label, c.share * CONTENT_W - 2 * PAD_X, 8, 'bold')
		);
		const height = Math.max(...lines.map((l) => l.length)) * 10 + 2 * PAD_Y;
		this.page.drawRectangle({
			x: MARGIN,
			y: this.y - height,
			width: CONTENT_W,
			height,
			color: tokenRgb('panel-100')
		});
		lines.forEach((ls, i) =>
			ls.forEach((l, k) =>
				this.text(l, xs[i] + PAD_X, this.y - PAD_Y - 8 - k * 10, 8, 'bold', 'panel-700')
			)
		);
		this.y -= height;
	}

	/** A row's cells as wrapped lines, and the row's height. */
	private layoutRow(s: Section, row: Cell[]) {
		const maxLines = Math.floor((BODY_TOP - BODY_BOTTOM - 64) / LINE_H);
		const cells = row.map((cell, i) => {
			const width = s.columns[i].share * CONTENT_W - 2 * PAD_X;
			let lines = paragraphs(cell).flatMap(([text, weight]) =>
				wrap(this.fonts, text, width, CELL_SIZE, weight).map((l) => ({ text: l, weight }))
			);
			// A row taller than a whole page is cut with an ellipsis rather than lost off the page.
			if (lines.length > maxLines)
				lines = [...lines.slice(0, maxLines - 1), { text: ELLIPSIS, weight: 'regular' as Weight }];
			const color = typeof cell === 'string' ? 'panel-900' : (cell.color ?? 'panel-900');
			return { lines, color };
		});
		return { cells, height: Math.max(...cells.map((c) => c.lines.length)) * LINE_H + 2 * PAD_Y };
	}

	section(s: Section) {
		const rows = s.rows.map((row) => this.layoutRow(s, row));
		// Keep the heading with the column header and the first row (or the "none" line).
		this.room(20 + 24 + (rows[0]?.height ?? 2 * LINE_H + 2 * PAD_Y));
		this.heading(s.title, s.rows.length);
		if (!s.rows.length) {
			this.text(s.empty, MARGIN, this.y - 10, 9, 'regular', 'panel-500');
			this.y -= 26;
			return;
		}
		this.tableHeader(s.columns);
		const xs = this.columnX(s.columns);
		for (const { cells, height } of rows) {
			if (this.room(height)) {
				this.heading(s.title, null, true);
				this.tableHeader(s.columns);
			}
			cells.forEach((c, i) =>
				c.lines.forEach((l, k) =>
					this.text(
						l.text,
						xs[i] + PAD_X,
						this.y - PAD_Y - CELL_SIZE - k * LINE_H,
						CELL_SIZE,
						l.weight,
						c.color
					)
				)
			);
			this.y -= height;
			this.page.drawRectangle({
				x: MARGIN,
				y: this.y,
				width: CONTENT_W,
				height: 0.5,
				color: tokenRgb('panel-200')
			});
		}
		this.y -= 18;
	}

	footers(stamp: string) {
		const total = this.pages.length;
		this.pages.forEach((page, i) => {
			this.page = page;
			page.drawRectangle({
				x: MARGIN,
				y: 42,
				width: CONTENT_W,
				height: 0.75,
				color: tokenRgb('panel-200')
			});
			const label = `Page ${i + 1} of ${total}`;
			const w = this.fonts.width(label, 8, 'bold');
			this.text(label, PAGE_W - MARGIN - w, 30, 8, 'bold', 'panel-700');
			this.text(stamp, MARGIN, 30, 8, 'regular', 'panel-700', CONTENT_W - w - 16);
		});
	}
}

/** Renders the history; fonts are subset to exactly the text of this document. */
export async function renderHistoryPdf(
	h: TrainingHistory,
	opts: HistoryPdfOptions
): Promise<Uint8Array> {
	const sections = sectionsOf(h);
	const zone = formatLocal(h.generatedAt, h.timeZone).split(' ').slice(2).join(' ');
	const stamp = `Generated on ${formatLocal(h.generatedAt, h.timeZone, false)} ${zone} (${h.timeZone}) by ${opts.generatedBy}. Times are plant time.`;
	const summary = `All times are plant time in ${h.timeZone}. ${h.acknowledgements.length} acknowledgements, ${h.attempts.length} knowledge-check attempts, ${h.signoffs.length} practical sign-offs, ${h.certificates.length} certificates, ${h.assignments.length} assignments.`;

	const doc = await PDFDocument.create();
	doc.setTitle(`Training history — ${h.person.displayName} (${h.person.employeeNo})`);
	doc.setSubject(`${h.plant.name}: training history`);
	doc.setProducer('Padbridge');
	doc.setCreator('Padbridge');
	doc.setCreationDate(h.generatedAt);
	doc.setModificationDate(h.generatedAt);

	const texts: [string, Weight][] = [
		['PADBRIDGE Training history Page of (continued) 0123456789' + ELLIPSIS, 'bold'],
		['0123456789' + ELLIPSIS, 'regular'],
		[h.plant.name, 'regular'],
		[h.person.displayName, 'bold'],
		[personLine(h), 'regular'],
		[stamp, 'regular'],
		[summary, 'regular']
	];
	for (const s of sections) {
		texts.push([s.title, 'bold'], [s.empty, 'regular']);
		for (const c of s.columns) texts.push([c.label, 'bold']);
		for (const row of s.rows) for (const cell of row) texts.push(...paragraphs(cell));
	}
	const fonts = await PdfFonts.embed(doc, texts);

	const w = new Writer(doc, fonts, h, opts);
	w.newPage();
	for (const line of wrap(fonts, summary, CONTENT_W, 9, 'regular')) {
		w.text(line, MARGIN, w.y - 10, 9, 'regular', 'panel-700');
		w.y -= 12;
	}
	w.y -= 12;
	for (const s of sections) w.section(s);
	w.footers(stamp);
	return doc.save({ useObjectStreams: true });
}
