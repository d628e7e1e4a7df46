// Practical sign-offs over HTTP against the built server: who may observe, photo checks, the two
// signatures and their binding, read-only steps after signing, and IDOR on another's sign-off.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
import { db } from '../../src/lib/server/db/index';
import {
	auditEvents,
	instructions,
	signatures,
	signoffs
} from '../../src/lib/server/db/schema/index';
import { loadEffectiveRevisions } from '../../src/lib/server/instructions/queries';
import { createChecklist } from '../../src/lib/server/training/signoffs/checklists';
import { closeDbHelpers, createTestPerson, retireTestPeople, type TestPerson } from '../helpers/db';
import { signInWithBadge, signInWithPassword, type HttpClient } from '../helpers/http-session';
import { insertTestCertificate } from '../helpers/certificate-fixtures';

const DAY = 86_400_000;

let trainer: TestPerson;
let expiredTrainer: TestPerson;
let operator: TestPerson;
let other: TestPerson;
let checklistId: number;
let itemIds: number[];
let trainerHttp: HttpClient;

async function startAs(client: HttpClient, personId: number) {
	return client.postForm('/signoffs/new?/start', { personId, checklistId, stationId: '' });
}

async function startedId(res: Response): Promise<number> {
	expect(res.status, await res.clone().text()).toBe(303);
	const m = /^\/signoffs\/(\d+)$/.exec(res.headers.get('location') ?? '');
	expect(m).not.toBeNull();
	return Number(m![1]);
}

function itemForm(itemId: number, result: string, comment = '', photo?: Blob, name = 'photo.png') {
	const fd = new FormData();
	fd.set('itemId', String(itemId));
	fd.set('result', result);
	fd.set('comment', comment);
	if (photo) fd.set('photo', photo, name);
	return fd;
}

async function pngBlob() {
	const png = await sharp({
		create: { width: 32, height: 24, channels: 3, background: { r: 200, g: 140, b: 20 } }
	})
		.png()
		.toBuffer();
	return new Blob([new Uint8Array(png)], { type: 'image/png' });
}

beforeAll(async () => {
	trainer = await createTestPerson({ roles: ['trainer'] });
	expiredTrainer = await createTestPerson({ roles: ['trainer'] });
	operator = await createTestPerson({ roles: ['operator'], withEmail: false });
	other = await createTestPerson({ roles: ['operator'], withEmail: false });
	await insertTestCertificate({ personId: trainer.id, processCode: 'COG-MB' });
	await insertTestCertificate({
		personId: expiredTrainer.id,
		processCode: 'COG-MB',
		issuedAt: new Date(Date.now() - 400 * DAY),
		expiresAt: new Date(Date.now() - DAY)
	});
	const [ins] = await db
		.select({ id: instructions.id })
		.from(instructions)
		.where(eq(instructions.docNumber, 'WI-COG-004'));
	const rev = (await loadEffectiveRevisions(new Date(), [ins.id])).get(ins.id)!;
	checklistId = await createChecklist(
		{ id: trainer.id, label: trainer.displayName, address: null },
		{
			title: `Test COG checklist ${trainer.employeeNo}`,
			revisionId: rev.id,
			items: ['ACF reel thaw time checked on the label', 'Buffer sheet replaced']
		}
	);
	const { getChecklist } = await import('../../src/lib/server/training/signoffs/checklists');
	itemIds = (await getChecklist(checklistId))!.items.map((i) => i.id);
	trainerHttp = await signInWithPassword(trainer.email!, trainer.password);
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
});

describe('who may observe', () => {
	it('refuses a trainer signing off their own practical, with a clear message', async () => {
		const res = await startAs(trainerHttp, trainer.id);
		expect(res.status).toBe(403);
		expect(await res.text()).toContain('You cannot sign off your own practical');
		const rows = await db.select().from(signoffs).where(eq(signoffs.personId, trainer.id));
		expect(rows).toHaveLength(0);
	});

	it('refuses a trainer whose certificate for the process has expired', async () => {
		const client = await signInWithPassword(expiredTrainer.email!, expiredTrainer.password);
		const res = await startAs(client, operator.id);
		expect(res.status).toBe(403);
		expect(await res.text()).toContain('You do not hold a valid certificate for COG-MB');
		const rows = await db.select().from(signoffs).where(eq(signoffs.trainerId, expiredTrainer.id));
		expect(rows).toHaveLength(0);
	});

	it('refuses an operator starting a sign-off at all', async () => {
		const client = await signInWithBadge(other.badge!, other.pin);
		const res = await startAs(client, operator.id);
		expect(res.status).toBe(403);
	});
});

describe('observe, sign, countersign', () => {
	let id: number;
	let operatorHttp: HttpClient;
	let otherHttp: HttpClient;

	beforeAll(async () => {
		operatorHttp = await signInWithBadge(operator.badge!, operator.pin);
		otherHttp = await signInWithBadge(other.badge!, other.pin);
		id = await startedId(await startAs(trainerHttp, operator.id));
	});

	it('refuses a photo whose content is not an image, with a field error, keeping the step open', async () => {
		const fake = new Blob([new TextEncoder().encode('<html><script>alert(1)</script></html>')], {
			type: 'image/png'
		});
		const res = await trainerHttp.post(
			`/signoffs/${id}?/item`,
			itemForm(itemIds[0], 'pass', 'label read', fake, 'label.png')
		);
		expect(res.status).toBe(415);
		const html = await res.text();
		expect(html).toContain('Only JPEG, PNG or WebP images are accepted');
		expect(html).toContain('Type not allowed.');
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('draft');
	});

	it('answers a photo over 10 MB, and one over the server-wide limit, on the photo field', async () => {
		const png = new Uint8Array(await (await pngBlob()).arrayBuffer());
		for (const [mb, message] of [
			[11, 'The file is 11.0 MB; images may be at most 10 MB.'],
			// Over the limit the body cannot be read: the step comes from the form's URL.
			[
				31,
				'The upload is larger than the server accepts, so nothing of this step was saved. Choose a photo of at most 10 MB and save the step again.'
			]
		] as const) {
			// A real PNG head, padded to the size: only the size may refuse it.
			const big = new Uint8Array(mb * 1024 * 1024);
			big.set(png, 0);
			const res = await trainerHttp.post(
				`/signoffs/${id}?/item&step=${itemIds[0]}`,
				itemForm(itemIds[0], 'pass', 'label read', new Blob([big], { type: 'image/png' }))
			);
			expect(res.status, `${mb} MB`).toBe(413);
			const html = await res.text();
			// Under step 1's photo field (its error is described by the input).
			expect(html, `${mb} MB`).toContain(message);
			expect(html).toMatch(new RegExp(`id="photo-${itemIds[0]}"[^>]*aria-invalid="true"`));
		}
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('draft');
	});

	it('refuses to sign while a step is unmarked', async () => {
		const res = await trainerHttp.postForm(`/signoffs/${id}?/sign`, { password: trainer.password });
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('not marked pass or fail');
	});

	it('records steps with a photo, then signs with the password, bound to the results', async () => {
		let res = await trainerHttp.post(
			`/signoffs/${id}?/item`,
			itemForm(itemIds[0], 'pass', 'Label says 4 h thawed', await pngBlob())
		);
		expect(res.status).toBe(200);
		res = await trainerHttp.post(`/signoffs/${id}?/item`, itemForm(itemIds[1], 'pass'));
		expect(res.status).toBe(200);

		const photo = await trainerHttp.get(`/signoffs/${id}/photos/${itemIds[0]}`);
		expect(photo.status).toBe(200);
		expect(photo.headers.get('content-type')).toBe('image/png');
		expect(photo.headers.get('content-security-policy')).toContain('sandbox');

		res = await trainerHttp.postForm(`/signoffs/${id}?/sign`, { password: 'not-my-password' });
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('did not match');

		res = await trainerHttp.postForm(`/signoffs/${id}?/sign`, { password: trainer.password });
		expect(res.status).toBe(303);
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('trainer_signed');
		expect(row.passed).toBe(true);
		expect(row.contentHash).toMatch(/^[0-9a-f]{64}$/);
		const sigs = await db.select().from(signatures).where(eq(signatures.recordId, id));
		const observed = sigs.filter((s) => s.recordType === 'signoff' && s.meaning === 'observed');
		expect(observed).toHaveLength(1);
		expect(observed[0].signerId).toBe(trainer.id);
		expect(observed[0].contentHash).toBe(row.contentHash);
	});

	it('keeps the steps read-only after the trainer signed', async () => {
		const res = await trainerHttp.post(`/signoffs/${id}?/item`, itemForm(itemIds[1], 'fail', 'x'));
		expect(res.status).toBe(409);
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('trainer_signed');
	});

	it('shows someone else nothing of the sign-off (404 without names) and refuses their countersign', async () => {
		const page = await otherHttp.get(`/signoffs/${id}`);
		expect(page.status).toBe(404);
		const html = await page.text();
		expect(html).not.toContain(operator.displayName);
		expect(html).not.toContain('Test COG checklist');
		const photo = await otherHttp.get(`/signoffs/${id}/photos/${itemIds[0]}`);
		expect(photo.status).toBe(404);
		const res = await otherHttp.postForm(`/signoffs/${id}?/countersign`, { password: other.pin });
		expect(res.status).toBe(404);
		const byTrainer = await trainerHttp.postForm(`/signoffs/${id}?/countersign`, {
			password: trainer.password
		});
		expect(byTrainer.status).toBe(403);
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('trainer_signed');
	});

	it('lists the sign-off as waiting on the operator’s page, and the operator countersigns with their PIN', async () => {
		const mine = await operatorHttp.get('/my-signoffs');
		expect(mine.status).toBe(200);
		const html = await mine.text();
		expect(html).toContain('Waiting for your countersignature');
		expect(html).toContain(`/signoffs/${id}`);

		const wrong = await operatorHttp.postForm(`/signoffs/${id}?/countersign`, {
			password: '000000'
		});
		expect(wrong.status).toBe(400);
		const res = await operatorHttp.postForm(`/signoffs/${id}?/countersign`, {
			password: operator.pin
		});
		expect(res.status).toBe(303);
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('countersigned');
		expect(row.operatorSignedAt).not.toBeNull();
		const sigs = await db.select().from(signatures).where(eq(signatures.recordId, id));
		const counter = sigs.filter((s) => s.recordType === 'signoff' && s.meaning === 'countersigned');
		expect(counter).toHaveLength(1);
		expect(counter[0].signerId).toBe(operator.id);
		expect(counter[0].contentHash).toBe(row.contentHash);

		const events = await db
			.select({ action: auditEvents.action })
			.from(auditEvents)
			.where(eq(auditEvents.entityId, String(id)));
		const actions = events.map((e) => e.action);
		for (const a of ['signoff.started', 'signoff.signed', 'signoff.countersigned'])
			expect(actions).toContain(a);
	});
});

describe('a failed step', () => {
	it('records the sign-off as failed at the trainer’s signature; no countersign is taken', async () => {
		const id = await startedId(await startAs(trainerHttp, operator.id));
		await trainerHttp.post(`/signoffs/${id}?/item`, itemForm(itemIds[0], 'pass'));
		await trainerHttp.post(
			`/signoffs/${id}?/item`,
			itemForm(itemIds[1], 'fail', 'Old buffer sheet left in')
		);
		const res = await trainerHttp.postForm(`/signoffs/${id}?/sign`, { password: trainer.password });
		expect(res.status).toBe(303);
		const [row] = await db.select().from(signoffs).where(eq(signoffs.id, id));
		expect(row.state).toBe('failed');
		expect(row.passed).toBe(false);
		const operatorHttp = await signInWithBadge(operator.badge!, operator.pin);
		const cs = await operatorHttp.postForm(`/signoffs/${id}?/countersign`, {
			password: operator.pin
		});
		expect(cs.status).toBe(409);
	});
});
