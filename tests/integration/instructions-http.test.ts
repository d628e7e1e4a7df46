// Routes of the built server: autosave conflicts, what an operator can reach, uploads, search.
import { beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import sharp from 'sharp';
import { db } from '../../src/lib/server/db/index';
import { auditEvents, revisionFiles, revisions } from '../../src/lib/server/db/schema/index';
import { getRevision } from '../../src/lib/server/instructions/queries';
import {
	approveAt,
	createTestPerson,
	makeInstruction,
	signIn,
	uniq,
	type Session,
	type TestPerson
} from '../helpers/instruction-fixtures';

let trainer: TestPerson;
let trainer2: TestPerson;
let quality: TestPerson;
let operator: TestPerson;
let asTrainer: Session;
let asTrainer2: Session;
let asOperator: Session;

beforeAll(async () => {
	trainer = await createTestPerson(['trainer']);
	trainer2 = await createTestPerson(['trainer']);
	quality = await createTestPerson(['quality']);
	operator = await createTestPerson(['operator']);
	asTrainer = await signIn(trainer);
	asTrainer2 = await signIn(trainer2);
	asOperator = await signIn(operator, 'badge');
});

const postJson = (s: Session, path: string, body: unknown) =>
	s.fetch(path, {
		method: 'POST',
		headers: { 'content-type': 'application/json' },
		body: JSON.stringify(body)
	});

describe('two people editing one draft', () => {
	it('gives the second save a 409 with the other text, and loses nothing', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# Start', stop: 'draft' }]);
		const url = `/api/v1/instructions/${fx.docNumber}/revisions/A/draft`;
		const opened = (await getRevision(fx.instructionId, 'A'))!.version;

		const first = await postJson(asTrainer, url, {
			source: '# Start\n\n1. Alice adds a step',
			version: opened
		});
		expect(first.status).toBe(200);
		const { version: afterFirst } = await first.json();
		expect(afterFirst).toBe(opened + 1);

		const mine = '# Start\n\n1. Bob adds a different step';
		const second = await postJson(asTrainer2, url, { source: mine, version: opened });
		expect(second.status).toBe(409);
		const body = await second.json();
		expect(body.error).toMatch(/saved this draft after you opened it/);
		expect(body.conflict.source).toBe('# Start\n\n1. Alice adds a step');
		expect(body.conflict.version).toBe(afterFirst);
		expect(body.conflict.editedBy).toBe(trainer.displayName);
		expect((await getRevision(fx.instructionId, 'A'))!.source).toBe(
			'# Start\n\n1. Alice adds a step'
		);

		// Bob decides to keep his text: saving on top of the version he was shown works.
		const third = await postJson(asTrainer2, url, { source: mine, version: body.conflict.version });
		expect(third.status).toBe(200);
		expect((await getRevision(fx.instructionId, 'A'))!.source).toBe(mine);

		const rev = (await getRevision(fx.instructionId, 'A'))!;
		const trail = await db
			.select({ action: auditEvents.action, actorId: auditEvents.actorId })
			.from(auditEvents)
			.where(and(eq(auditEvents.entityType, 'revision'), eq(auditEvents.entityId, String(rev.id))));
		expect(
			trail.filter((t) => t.action === 'revision.save_conflict').map((t) => t.actorId)
		).toEqual([trainer2.id]);
		expect(trail.filter((t) => t.action === 'revision.draft_saved').length).toBeGreaterThanOrEqual(
			3
		);
	});

	it('answers bad autosave bodies with 400 and field errors', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# x', stop: 'draft' }]);
		const res = await postJson(
			asTrainer,
			`/api/v1/instructions/${fx.docNumber}/revisions/A/draft`,
			{ source: 5 }
		);
		expect(res.status).toBe(400);
		expect((await res.json()).fields).toBeTruthy();
	});

	it('refuses autosave from another origin and from an operator', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# x', stop: 'draft' }]);
		const url = `/api/v1/instructions/${fx.docNumber}/revisions/A/draft`;
		const cross = await asTrainer.fetch(url, {
			method: 'POST',
			headers: { 'content-type': 'application/json', origin: 'http://evil.example' },
			body: JSON.stringify({ source: 'x', version: 1 })
		});
		expect(cross.status).toBe(403);
		const op = await postJson(asOperator, url, { source: 'x', version: 1 });
		expect(op.status).toBe(403);
	});
});

describe('an operator sees only the revision in force', () => {
	let fx: Awaited<ReturnType<typeof makeInstruction>>;
	beforeAll(async () => {
		const png = await sharp({
			create: { width: 40, height: 30, channels: 3, background: { r: 200, g: 100, b: 0 } }
		})
			.png()
			.toBuffer();
		fx = await makeInstruction(trainer, quality, [
			{ source: '# Old rev A\n\n1. OLDSTEP', stop: 'draft' }
		]);
		// Give A a file so its file route can be probed after it is superseded.
		const up = new FormData();
		up.set('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'old.png');
		expect(
			(
				await asTrainer.fetch(`/api/v1/instructions/${fx.docNumber}/revisions/A/files`, {
					method: 'POST',
					body: up
				})
			).status
		).toBe(201);
		const a = (await getRevision(fx.instructionId, 'A'))!;
		const { submitRevision, createNextRevision, saveDraft } =
			await import('../../src/lib/server/instructions/workflow');
		await submitRevision(trainer.actor, a.id, {
			version: a.version,
			changeSummary: 's',
			reason: 'r',
			classification: 'editorial'
		});
		await approveAt(quality, a.id, new Date(Date.now() - 60_000));
		const b = await createNextRevision(trainer.actor, fx.instructionId);
		const bRev = (await getRevision(fx.instructionId, b.letter))!;
		const saved = await saveDraft(trainer.actor, b.id, {
			source: '# New rev B\n\n1. NEWSTEP',
			version: bRev.version
		});
		await submitRevision(trainer.actor, b.id, {
			version: saved.version,
			changeSummary: 's',
			reason: 'r',
			classification: 'acknowledge'
		});
		await approveAt(quality, b.id, new Date());
		const c = await createNextRevision(trainer.actor, fx.instructionId);
		expect(c.letter).toBe('C');
	});

	it('gets rev B at the point of use, and 404 for A (superseded) and C (draft) by page, API and file URL', async () => {
		const page = await asOperator.fetch(`/instructions/${fx.docNumber}`);
		expect(page.status).toBe(200);
		const html = await page.text();
		expect(html).toContain('NEWSTEP');
		expect(html).not.toContain('OLDSTEP');

		for (const path of [
			`/instructions/${fx.docNumber}/revisions/A`,
			`/instructions/${fx.docNumber}/revisions/C`,
			`/instructions/${fx.docNumber}/revisions/C/edit`,
			`/api/v1/instructions/${fx.docNumber}/revisions/A`,
			`/api/v1/instructions/${fx.docNumber}/revisions/C`
		]) {
			const res = await asOperator.fetch(path);
			expect([403, 404], path).toContain(res.status);
			const text = await res.text();
			expect(text, path).not.toContain('OLDSTEP');
		}
		const aFiles = await db
			.select({ id: revisionFiles.id })
			.from(revisionFiles)
			.innerJoin(revisions, eq(revisions.id, revisionFiles.revisionId))
			.where(and(eq(revisions.instructionId, fx.instructionId), eq(revisions.letter, 'A')));
		const fileRes = await asOperator.fetch(
			`/instructions/${fx.docNumber}/revisions/A/files/${aFiles[0].id}`
		);
		expect(fileRes.status).toBe(404);

		const api = await asOperator.fetch(`/api/v1/instructions/${fx.docNumber}`);
		expect(api.status).toBe(200);
		expect((await api.json()).revision).toBe('B');
		// The effective revision by its letter sends the operator to the point of use.
		const byLetter = await asOperator.fetch(`/instructions/${fx.docNumber}/revisions/B`);
		expect(byLetter.status).toBe(303);
		expect(byLetter.headers.get('location')).toBe(`/instructions/${fx.docNumber}`);
		// Archive search is not for operators; effective search shows only B.
		expect((await asOperator.fetch(`/api/v1/search?q=OLDSTEP&scope=all`)).status).toBe(403);
		const found = await (await asOperator.fetch(`/api/v1/search?q=OLDSTEP`)).json();
		expect(found.results).toEqual([]);
	});

	it('shows the archive copy of A to a trainer, marked superseded', async () => {
		const res = await asTrainer.fetch(`/instructions/${fx.docNumber}/revisions/A`);
		expect(res.status).toBe(200);
		const html = await res.text();
		expect(html).toContain('SUPERSEDED');
		expect(html).toContain('OLDSTEP');
	});

	it('never labels a superseded revision as current in the register for an operator', async () => {
		const html = await (await asOperator.fetch(`/instructions?q=${fx.docNumber}`)).text();
		expect(html).toContain('rev B');
		expect(html).not.toContain('rev A');
		expect(html).not.toContain('rev C');
	});
});

describe('upload abuse', () => {
	let doc: string;
	const upload = (name: string, bytes: Uint8Array, type = 'application/octet-stream') => {
		const f = new FormData();
		f.set('file', new Blob([bytes as BlobPart], { type }), name);
		return asTrainer.fetch(`/api/v1/instructions/${doc}/revisions/A/files`, {
			method: 'POST',
			body: f
		});
	};
	beforeAll(async () => {
		doc = (await makeInstruction(trainer, quality, [{ source: '# Files', stop: 'draft' }]))
			.docNumber;
	});

	it('refuses an EXE renamed to .png, by its content', async () => {
		const exe = new Uint8Array(4096);
		exe.set([0x4d, 0x5a, 0x90, 0x00, 0x03], 0); // "MZ" DOS/PE header
		exe.set(new TextEncoder().encode('This program cannot be run in DOS mode.'), 0x4e);
		const res = await upload('photo.png', exe, 'image/png');
		expect(res.status).toBe(415);
		expect((await res.json()).error).toMatch(
			/Only JPEG, PNG or WebP images and PDF files are accepted/
		);
	});

	it('refuses HTML named .jpg and an SVG with a script', async () => {
		const html = await upload(
			'x.jpg',
			new TextEncoder().encode('<html><script>alert(1)</script></html>'),
			'image/jpeg'
		);
		expect(html.status).toBe(415);
		const svg = await upload(
			'drawing.svg',
			new TextEncoder().encode(
				'<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'
			),
			'image/svg+xml'
		);
		expect(svg.status).toBe(415);
		expect((await svg.json()).error).toMatch(/SVG drawings are not accepted/);
		const disguised = await upload(
			'drawing.png',
			new TextEncoder().encode('<?xml version="1.0"?><svg onload="alert(1)"></svg>'),
			'image/png'
		);
		expect(disguised.status).toBe(415);
	});

	it('refuses an empty file, an image one byte over 10 MB and a body over the server limit', async () => {
		const empty = await upload('empty.png', new Uint8Array(0), 'image/png');
		expect(empty.status).toBe(400);
		expect((await empty.json()).error).toMatch(/empty \(0 bytes\)/);
		const big = new Uint8Array(10 * 1024 * 1024 + 1);
		big.set(
			[0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52],
			0
		);
		const res = await upload('big.png', big, 'image/png');
		expect(res.status).toBe(413);
		expect((await res.json()).error).toMatch(/at most 10 MB/);
		// Over the server-wide body limit (30 MB) the body cannot be read, yet the answer is the
		// same kind: 413 with { error, fields }, not "send the file as multipart".
		const huge = new Uint8Array(31 * 1024 * 1024);
		huge.set(big.subarray(0, 16), 0);
		const over = await upload('huge.png', huge, 'image/png');
		expect(over.status).toBe(413);
		expect(await over.json()).toEqual({
			error: expect.stringMatching(/larger than the server accepts: images may be at most 10 MB/),
			fields: { file: 'Too large.' }
		});
	});

	it('answers the same two sizes on the upload form of the edit page, in the page', async () => {
		const post = (bytes: Uint8Array) => {
			const f = new FormData();
			f.set('file', new Blob([bytes as BlobPart], { type: 'image/png' }), 'big.png');
			// As a browser without JavaScript posts it: the page comes back drawn again.
			return asTrainer.fetch(`/instructions/${doc}/revisions/A/edit?/upload`, {
				method: 'POST',
				body: f,
				headers: { accept: 'text/html' }
			});
		};
		const png = [
			0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52
		];
		for (const [mb, status, text] of [
			[11, 413, /at most 10 MB/],
			[31, 413, /larger than the server accepts\. Images may be at most 10 MB/]
		] as const) {
			const bytes = new Uint8Array(mb * 1024 * 1024);
			bytes.set(png, 0);
			const res = await post(bytes);
			const html = await res.text();
			expect(res.status, `${mb} MB`).toBe(status);
			expect(html, `${mb} MB`).toMatch(text);
			expect(html).toContain('action="?/upload"');
		}
	});

	it('refuses a pixel flood', async () => {
		const flood = await sharp({
			create: { width: 9000, height: 9000, channels: 3, background: { r: 0, g: 0, b: 0 } }
		})
			.png()
			.toBuffer();
		expect(flood.byteLength).toBeLessThan(10 * 1024 * 1024);
		const res = await upload('flood.png', new Uint8Array(flood), 'image/png');
		expect(res.status).toBe(413);
		expect((await res.json()).error).toMatch(/megapixels/);
	});

	it('strips the path from a name, stores under a random key, and strips EXIF/GPS', async () => {
		const jpeg = await sharp({
			create: { width: 64, height: 48, channels: 3, background: { r: 10, g: 120, b: 200 } }
		})
			.jpeg()
			.withExif({
				IFD0: { Make: 'SpyCam', Model: 'GPS-1' },
				IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '10/1 45/1 0/1' }
			})
			.toBuffer();
		expect((await sharp(jpeg).metadata()).exif).toBeTruthy();
		const res = await upload(
			'../../etc/passwd/..\\evil<b>.jpg',
			new Uint8Array(jpeg),
			'image/jpeg'
		);
		expect(res.status).toBe(201);
		const added = await res.json();
		expect(added.originalName).toBe('evil-b-.jpg');
		const [row] = await db.select().from(revisionFiles).where(eq(revisionFiles.id, added.id));
		expect(row.storageKey).toMatch(/^revisions\/\d+\/[0-9a-f-]{36}\.jpg$/);
		expect(row.storageKey).not.toContain('evil');

		const served = await asTrainer.fetch(`/instructions/${doc}/revisions/A/files/${added.id}`);
		expect(served.status).toBe(200);
		expect(served.headers.get('x-content-type-options')).toBe('nosniff');
		expect(served.headers.get('content-security-policy')).toBe("sandbox; default-src 'none'");
		expect(served.headers.get('content-disposition')).toMatch(/^inline; filename="evil-b-.jpg"/);
		expect(served.headers.get('content-type')).toBe('image/jpeg');
		const bytes = Buffer.from(await served.arrayBuffer());
		const meta = await sharp(bytes).metadata();
		expect(meta.exif).toBeUndefined();
		expect(bytes.includes(Buffer.from('SpyCam'))).toBe(false);
	});

	it('accepts a PDF and serves it as an attachment', async () => {
		const { PDFDocument } = await import('pdf-lib');
		const pdf = await PDFDocument.create();
		pdf.addPage([200, 200]);
		const res = await upload('ACF data sheet.pdf', await pdf.save(), 'application/pdf');
		expect(res.status).toBe(201);
		const added = await res.json();
		const served = await asTrainer.fetch(`/instructions/${doc}/revisions/A/files/${added.id}`);
		expect(served.headers.get('content-disposition')).toMatch(
			/^attachment; filename="ACF-data-sheet.pdf"/
		);
	});

	it('freezes files once the revision is approved', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# Frozen' }]);
		const png = await sharp({
			create: { width: 8, height: 8, channels: 3, background: { r: 0, g: 0, b: 0 } }
		})
			.png()
			.toBuffer();
		const f = new FormData();
		f.set('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'late.png');
		const res = await asTrainer.fetch(`/api/v1/instructions/${fx.docNumber}/revisions/A/files`, {
			method: 'POST',
			body: f
		});
		expect(res.status).toBe(409);
		expect((await res.json()).error).toMatch(/frozen/);
	});
});

describe('search', () => {
	it('finds a word published a moment ago, without a restart', async () => {
		const word = `zephyrquill${uniq()}`;
		const fx = await makeInstruction(trainer, quality, [
			{ source: `# Fresh\n\n1. Wipe with ${word} cloth`, stop: 'review' }
		]);
		const q = `/api/v1/search?q=${word}`;
		expect((await (await asOperator.fetch(q)).json()).results).toEqual([]);
		// Trainers find it in the drafts-and-archive scope once this instance has noticed the change
		// (the epoch row is checked at most every two seconds).
		let inReview: { docNumber: string }[] = [];
		for (let k = 0; k < 20 && !inReview.length; k++) {
			await new Promise((r) => setTimeout(r, 300));
			inReview = (await (await asTrainer.fetch(`${q}&scope=all`)).json()).results;
		}
		expect(inReview.map((r) => r.docNumber)).toEqual([fx.docNumber]);
		expect((await (await asOperator.fetch(q)).json()).results).toEqual([]);

		// Published by another process (this test), so the app must notice via the epoch row.
		await approveAt(quality, fx.revisionIds[0], new Date());
		let hits: { docNumber: string; snippetHtml: string; letter: string }[] = [];
		for (let k = 0; k < 20 && !hits.length; k++) {
			await new Promise((r) => setTimeout(r, 300));
			hits = (await (await asOperator.fetch(q)).json()).results;
		}
		expect(hits.map((h) => h.docNumber)).toEqual([fx.docNumber]);
		expect(hits[0].letter).toBe('A');
		expect(hits[0].snippetHtml).toContain(`<mark>${word}</mark>`);
	});

	it('escapes instruction text in snippets', async () => {
		const word = `quillmark${uniq()}`;
		await makeInstruction(trainer, quality, [
			{ source: `# T\n\nuse <b onmouseover=alert(1)>${word}</b> here` }
		]);
		let hits: { snippetHtml: string }[] = [];
		for (let k = 0; k < 20 && !hits.length; k++) {
			await new Promise((r) => setTimeout(r, 300));
			hits = (await (await asOperator.fetch(`/api/v1/search?q=${word}`)).json()).results;
		}
		expect(hits).toHaveLength(1);
		expect(hits[0].snippetHtml).not.toMatch(/<b|onmouseover=alert\(1\)>/);
		expect(hits[0].snippetHtml).toContain('&lt;b');
	});

	it('answers a too-long query with 400', async () => {
		const res = await asOperator.fetch(`/api/v1/search?q=${'x'.repeat(101)}`);
		expect(res.status).toBe(400);
		expect((await res.json()).fields.q).toBeTruthy();
	});
});
