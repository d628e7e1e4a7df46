// Script-injection payloads in Markdown, titles, people's names and file names: none may run in
// Chromium on any view of an instruction (point of use, archive, editor preview, review, search).
import { expect, test } from '@playwright/test';
import sharp from 'sharp';
import { eq } from 'drizzle-orm';
import { db } from '../../src/lib/server/db/index';
import { revisions } from '../../src/lib/server/db/schema/index';
import { addRevisionFile } from '../../src/lib/server/instructions/files';
import {
	createNextRevision,
	saveDraft,
	submitRevision
} from '../../src/lib/server/instructions/workflow';
import {
	createTestPerson,
	makeInstruction,
	uniq,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { signInPage, watchForScript } from '../helpers/instruction-browser';

export const MARKDOWN_PAYLOADS = [
	'<script>alert(1)</script>',
	'<img src=x onerror=alert(2)>',
	'[click](javascript:alert(3))',
	'[click](JaVaScRiPt:alert(4))',
	'[data](data:text/html;base64,PHNjcmlwdD5hbGVydCg1KTwvc2NyaXB0Pg==)',
	'![img](javascript:alert(6))',
	'<svg onload=alert(7)>',
	'<iframe src="javascript:alert(8)"></iframe>',
	'<a href="&#106;avascript:alert(9)">x</a>',
	'[x](&#x6A;avascript:alert(10))',
	'<div style="background:url(javascript:alert(11))">x</div>',
	'<div style="width: expression(alert(12))">x</div>',
	"{{constructor.constructor('alert(13)')()}}",
	'<details open ontoggle=alert(14)>x</details>',
	'<body onload=alert(15)>',
	'<math><mtext><table><mglyph><style><img src=x onerror=alert(16)>',
	'<scr<script>ipt>alert(17)</script>',
	'| a | b |\n|---|---|\n| <img src=x onerror=alert(18)> | x |',
	'![x" onerror="alert(19)](asset:none.png)',
	'[x](vbscript:alert(20))',
	'<object data="javascript:alert(21)"></object>',
	'<form action="javascript:alert(22)"><button>x</button></form>',
	'```calc bond-force"><img src=x onerror=alert(23)>\nbasis: bump\n```',
	'<a href="javascript&colon;alert(24)">x</a>',
	'![a](data:image/svg+xml;base64,PHN2ZyBvbmxvYWQ9YWxlcnQoMjUpPjwvc3ZnPg==)',
	'<style>@import "javascript:alert(26)";</style>',
	'[x](javascript://%0aalert(27))',
	'<a href="  javascript:alert(28)">x</a>'
];

const TITLE = '<img src=x onerror=alert(101)> Payload <script>alert(102)</script> xsstitle';
const FILE_NAME = '"><img src=x onerror=alert(301)>.png';

let author: TestPerson;
let quality: TestPerson;
let operator: TestPerson;
let doc: string;
const word = `xssword${uniq()}`;

test.beforeAll(async () => {
	expect(MARKDOWN_PAYLOADS.length).toBeGreaterThanOrEqual(20);
	author = await createTestPerson(['trainer'], '<svg/onload=alert(201)>Mallory "Author"');
	quality = await createTestPerson(['quality']);
	operator = await createTestPerson(['operator']);
	const body = `# ${word}\n\n${MARKDOWN_PAYLOADS.join('\n\n')}\n`;
	const fx = await makeInstruction(author, quality, [{ source: body }], { title: TITLE });
	doc = fx.docNumber;
	// Revision B in review with a file whose name carries a payload, for the review and editor views.
	const b = await createNextRevision(author.actor, fx.instructionId);
	const png = await sharp({
		create: { width: 4, height: 4, channels: 3, background: { r: 1, g: 2, b: 3 } }
	})
		.png()
		.toBuffer();
	const added = await addRevisionFile(author.actor, b.id, {
		name: FILE_NAME,
		bytes: new Uint8Array(png)
	});
	const [rev] = await db.select().from(revisions).where(eq(revisions.id, b.id));
	const saved = await saveDraft(author.actor, b.id, {
		source: `${body}\n![pic](asset:${added.originalName} "<img src=x onerror=alert(302)>")\n`,
		version: rev.version
	});
	await submitRevision(author.actor, b.id, {
		version: saved.version,
		changeSummary: '<script>alert(401)</script>',
		reason: '<img src=x onerror=alert(402)>',
		classification: 'editorial'
	});
});

async function expectNoScript(page: import('@playwright/test').Page, events: string[]) {
	await page.waitForTimeout(300);
	expect(events).toEqual([]);
	const injected = await page.evaluate(() => {
		const bodies = [...document.querySelectorAll('.instruction-body')];
		return bodies.flatMap((b) =>
			[...b.querySelectorAll('*')]
				.filter(
					(el) =>
						['SCRIPT', 'IFRAME', 'OBJECT', 'EMBED', 'FORM', 'STYLE', 'SVG', 'MATH'].includes(
							el.tagName.toUpperCase()
						) ||
						[...el.attributes].some(
							(a) => /^on/i.test(a.name) || /^\s*(javascript|data|vbscript):/i.test(a.value)
						)
				)
				.map((el) => el.outerHTML.slice(0, 80))
		);
	});
	expect(injected).toEqual([]);
}

test('no payload runs for the operator at the point of use', async ({ page }) => {
	const events = watchForScript(page);
	await signInPage(page, operator, 'badge');
	await page.goto(`/instructions/${doc}`);
	await expectNoScript(page, events);
	// The payloads are shown as text, not dropped silently.
	await expect(page.getByRole('heading', { name: /xsstitle/ })).toBeVisible();
	await expect(page.getByText('<script>alert(1)</script>')).toBeVisible();
	await page.goto('/instructions');
	await expectNoScript(page, events);
	await page.getByRole('combobox', { name: 'Search instructions' }).fill(word);
	await expect(page.getByRole('option').filter({ hasText: doc })).toBeVisible();
	await expectNoScript(page, events);
});

test('no payload runs in the archive, editor preview and review views', async ({ browser }) => {
	const q = await (await browser.newContext()).newPage();
	const events = watchForScript(q);
	await signInPage(q, quality);
	for (const path of [
		`/instructions/${doc}`,
		`/instructions/${doc}/revisions/A`,
		`/instructions/${doc}/revisions/B`
	]) {
		await q.goto(path);
		await expectNoScript(q, events);
	}
	await q.goto(`/instructions/${doc}/revisions/B/review`);
	await expect(q.getByText('<script>alert(401)</script>')).toBeVisible();
	await expectNoScript(q, events);
	await q.getByRole('button', { name: 'Source line diff' }).click();
	await expectNoScript(q, events);

	// The editor: put revision B back to draft (send back) and type payloads into the live preview.
	await q.getByLabel('What must change').fill('<img src=x onerror=alert(501)>');
	await q.getByRole('button', { name: 'Send back with comments' }).click();
	await expect(q).toHaveURL(new RegExp(`/revisions/B$`));
	const t = await (await browser.newContext()).newPage();
	const tEvents = watchForScript(t);
	await signInPage(t, author);
	await t.goto(`/instructions/${doc}/revisions/B/edit`);
	await expect(t.getByText('<img src=x onerror=alert(501)>')).toBeVisible();
	await t
		.getByRole('textbox', { name: 'Markdown' })
		.fill(MARKDOWN_PAYLOADS.join('\n\n') + `\n\npreviewed-${word}`);
	await expect(t.getByTestId('preview')).toContainText(`previewed-${word}`);
	await expectNoScript(t, tEvents);
	await expect(t.getByRole('link', { name: /img-src-x-onerror-alert-301/ })).toBeVisible();
	await expectNoScript(t, tEvents);
});

test('the CSP header allows no inline script', async ({ request }) => {
	const res = await request.get('/signin');
	const csp = res.headers()['content-security-policy'] ?? '';
	expect(csp).toMatch(/script-src 'self'/);
	expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
});
