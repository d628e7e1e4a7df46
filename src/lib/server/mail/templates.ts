// Mail layout: every message has a plain-text and an HTML part built from the same structured
// notice, so both say the same thing. Every interpolated value is escaped in the HTML part; links
// are absolute, from config.publicUrl. Colours come from the design tokens (tailwind.config.ts),
// inlined because mail clients ignore style sheets.
import tokens from '../../../../tailwind.config';
import { config } from '../config';

const C = tokens.theme.extend.colors;

/** Who reads the message: the person it is about, or a line lead reading for them. */
export type Audience =
	| { kind: 'self'; name: string }
	| {
			kind: 'lead';
			name: string;
			about: { name: string; badge: string | null; line: string | null };
	  };

export interface MailContent {
	subject: string;
	text: string;
	html: string;
}

/** The parts of one message before layout. */
export interface Notice {
	subject: string;
	/** What happened, in one or two sentences. */
	summary: string;
	/** What the reader (or the person a lead reads for) must do. */
	todo?: string;
	details?: [label: string, value: string][];
	action?: { label: string; path: string };
	/** A caution shown in its own box (e.g. do not run the bonder). */
	caution?: string;
}

/** A notice written per audience: "your certificate" to the person, "their certificate" to a lead. */
export type NoticeFor = (a: Audience) => Notice;

export function escapeHtml(value: unknown): string {
	return String(value ?? '').replace(
		/[&<>"']/g,
		(c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!
	);
}

/** An absolute link into Padbridge. */
export function appLink(path: string): string {
	return `${config.publicUrl}${path.startsWith('/') ? path : `/${path}`}`;
}

const FOOTER =
	'Sent by Padbridge, the training and certification system of ' +
	`${config.plantName}. You receive this because of your role or your training record; ` +
	'every message sent to you or about you is listed under Messages when you sign in.';

function aboutLine(a: Audience): string | null {
	if (a.kind !== 'lead') return null;
	const who = [a.about.name, a.about.badge ? `badge ${a.about.badge}` : null, a.about.line]
		.filter(Boolean)
		.join(', ');
	return `This message is about ${who}, who has no e-mail address in Padbridge. Please pass it on to them in person.`;
}

/** Lays a notice out as plain text and HTML for one reader. */
export function renderNotice(a: Audience, n: Notice): MailContent {
	const about = aboutLine(a);
	const subject = a.kind === 'lead' ? `${n.subject} (for ${a.about.name})` : n.subject;
	const url = n.action ? appLink(n.action.path) : null;

	const text = [
		`Hello ${a.name},`,
		about,
		n.summary,
		n.todo ? `What to do: ${n.todo}` : null,
		n.caution ? `Caution: ${n.caution}` : null,
		n.details?.length ? n.details.map(([k, v]) => `${k}: ${v}`).join('\n') : null,
		url && n.action ? `${n.action.label}: ${url}` : null,
		`-- \n${FOOTER}`
	]
		.filter((p): p is string => Boolean(p))
		.join('\n\n');

	const p = (s: string, style = '') => `<p style="margin:0 0 14px;${style}">${escapeHtml(s)}</p>`;
	const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;padding:24px;background:${C.panel[50]};color:${C.panel[900]};font:16px/1.5 system-ui,sans-serif">
<div style="max-width:600px;margin:0 auto;background:white;border:1px solid ${C.panel[200]};border-radius:8px;padding:24px">
<p style="margin:0 0 16px;font-weight:bold;color:${C.panel[600]}">Padbridge · ${escapeHtml(config.plantName)}</p>
${p(`Hello ${a.name},`)}
${about ? p(about, `padding:10px;border-left:4px solid ${C.glass[500]};background:${C.glass[50]}`) : ''}
${p(n.summary)}
${n.todo ? `<p style="margin:0 0 14px"><strong>What to do:</strong> ${escapeHtml(n.todo)}</p>` : ''}
${n.caution ? `<p style="margin:0 0 14px;padding:10px;border-left:4px solid ${C.film[500]};background:${C.film[50]}"><strong>Caution:</strong> ${escapeHtml(n.caution)}</p>` : ''}
${
	n.details?.length
		? `<table style="border-collapse:collapse;margin:0 0 16px">${n.details
				.map(
					([k, v]) =>
						`<tr><th style="text-align:left;padding:4px 12px 4px 0;color:${C.panel[600]};font-weight:normal">${escapeHtml(k)}</th><td style="padding:4px 0">${escapeHtml(v)}</td></tr>`
				)
				.join('')}</table>`
		: ''
}
${url && n.action ? `<p style="margin:0 0 20px"><a href="${escapeHtml(url)}" style="display:inline-block;padding:10px 16px;background:${C.film[400]};color:${C.panel[900]};border-radius:6px;font-weight:bold;text-decoration:none">${escapeHtml(n.action.label)}</a></p><p style="margin:0 0 20px;font-size:13px;color:${C.panel[600]}">${escapeHtml(url)}</p>` : ''}
<p style="margin:24px 0 0;font-size:13px;color:${C.panel[500]}">${escapeHtml(FOOTER)}</p>
</div></body></html>`;
	return { subject, text, html };
}

export interface DigestItem {
	personName: string;
	badge: string | null;
	/** One line: what they need, e.g. "COG-MB certificate expires 2026-12-01 (in 7 days)". */
	need: string;
}

/** The daily digest for a line lead: new notices and still-open needs of their crew without e-mail. */
export function renderDigest(
	leadName: string,
	plantDate: string,
	line: string,
	fresh: DigestItem[],
	open: DigestItem[]
): MailContent {
	const subject = `Daily crew digest ${line} · ${plantDate}: ${fresh.length + open.length} item${fresh.length + open.length === 1 ? '' : 's'}`;
	const url = appLink('/messages');
	const item = (i: DigestItem) =>
		`${i.personName}${i.badge ? ` (badge ${i.badge})` : ''}: ${i.need}`;
	const intro =
		'These people on your line have no e-mail address in Padbridge, so their notices come to you ' +
		'once a day. Please pass each item on in person.';
	const text = [
		`Hello ${leadName},`,
		intro,
		fresh.length
			? `New since the last digest:\n${fresh.map((i) => `- ${item(i)}`).join('\n')}`
			: null,
		open.length ? `Still open:\n${open.map((i) => `- ${item(i)}`).join('\n')}` : null,
		`Messages in Padbridge: ${url}`,
		`-- \n${FOOTER}`
	]
		.filter((p): p is string => Boolean(p))
		.join('\n\n');
	const list = (title: string, items: DigestItem[]) =>
		items.length
			? `<h2 style="font-size:17px;margin:20px 0 8px">${escapeHtml(title)}</h2><ul style="margin:0 0 14px;padding-left:20px">${items
					.map(
						(i) =>
							`<li style="margin:0 0 6px"><strong>${escapeHtml(i.personName)}</strong>${i.badge ? ` <span style="font-family:monospace">(badge ${escapeHtml(i.badge)})</span>` : ''}: ${escapeHtml(i.need)}</li>`
					)
					.join('')}</ul>`
			: '';
	const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;padding:24px;background:${C.panel[50]};color:${C.panel[900]};font:16px/1.5 system-ui,sans-serif">
<div style="max-width:600px;margin:0 auto;background:white;border:1px solid ${C.panel[200]};border-radius:8px;padding:24px">
<p style="margin:0 0 16px;font-weight:bold;color:${C.panel[600]}">Padbridge · ${escapeHtml(config.plantName)} · line ${escapeHtml(line)} · ${escapeHtml(plantDate)}</p>
<p style="margin:0 0 14px">Hello ${escapeHtml(leadName)},</p>
<p style="margin:0 0 14px">${escapeHtml(intro)}</p>
${list('New since the last digest', fresh)}
${list('Still open', open)}
<p style="margin:20px 0"><a href="${escapeHtml(url)}" style="color:${C.glass[700]}">${escapeHtml(url)}</a></p>
<p style="margin:24px 0 0;font-size:13px;color:${C.panel[500]}">${escapeHtml(FOOTER)}</p>
</div></body></html>`;
	return { subject, text, html };
}
