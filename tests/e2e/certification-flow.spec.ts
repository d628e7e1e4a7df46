// Flow 2 end to end in Chromium: an operator acknowledges the revision, takes a knowledge check
// with a calculated question, fails, waits out the cool-down, passes; a certified trainer signs
// the practical sign-off and the operator countersigns; the certificate is issued and its PDF,
// downloaded from the page, is read back (text layer, OCR of the name, QR → verify page).
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { createTestPerson, uniq, type TestPerson } from '../helpers/instruction-fixtures';
import { signInPage } from '../helpers/instruction-browser';
import {
	insertCertificate,
	makeChecklist,
	makeInstructionRows,
	makeRule
} from '../helpers/training-fixtures';
import { addQuestions } from '../helpers/check-fixtures';
import { decodeQr, ocrLine, readPdf } from '../helpers/pdf-readback';
import { db } from '../../src/lib/server/db/index';
import { processes } from '../../src/lib/server/db/schema/index';
import {
	approveVersion,
	createCheck,
	submitVersion,
	updateVersionSettings
} from '../../src/lib/server/training/checks/index';
import { runCalculator } from '../../src/lib/calculators/registry';

const COOLDOWN_MIN = 1;
let operator: TestPerson;
let trainer: TestPerson;
let checkCode: string;
let docNumber: string;
let processName: string;
let processCode: string;

test.beforeAll(async () => {
	trainer = await createTestPerson(['trainer']);
	const quality = await createTestPerson(['quality']);
	operator = await createTestPerson(['operator'], 'Đặng Thị Mai Thư / 张磊');
	const tag = uniq().toUpperCase();
	processName = `E2E bond ${tag}`;
	processCode = `E2E-${tag}`;
	const [{ id: processId }] = await db
		.insert(processes)
		.values({ code: processCode, name: processName, bondType: 'COG' })
		.$returningId();
	const ins = await makeInstructionRows(quality.id, processId, [
		{ letter: 'A', effectiveFrom: new Date(Date.now() - 86_400_000) }
	]);
	docNumber = ins.docNumber;
	checkCode = `KC-E${tag.slice(0, 6)}`;
	const { id: checkId, versionId } = await createCheck(trainer.actor, {
		code: checkCode,
		title: `Bond force check ${tag}`,
		processId
	});
	await updateVersionSettings(trainer.actor, versionId, {
		questionsPerAttempt: 2,
		timeLimitMin: null,
		attemptsBeforeCooldown: 1,
		cooldownMin: COOLDOWN_MIN,
		revisionId: null
	});
	await addQuestions(trainer, versionId, [
		{
			kind: 'calculated',
			prompt:
				'Bumps {bumpWidthUm} × {bumpLengthUm} µm, {bumpCount} bumps, {pressureMPa} MPa on the bump area: what force in N do you enter?',
			calculatorId: 'bond-force',
			output: 'forceN',
			unit: 'N',
			tolerancePct: '2',
			params:
				'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 50..80 step 5',
			explanation: 'Force = bump count × bump area × pressure.'
		},
		{
			kind: 'true_false',
			prompt: 'PTFE buffer sheet can give off harmful fumes when overheated.',
			trueFalse: 'true',
			explanation: 'Keep the head at the recipe temperature and use the extraction.'
		}
	]);
	await submitVersion(trainer.actor, versionId);
	await approveVersion(quality.actor, versionId, { password: quality.password });
	const checklistId = await makeChecklist(processId, ins.revisionIds[0], trainer.id);
	const ruleId = await makeRule({
		processId,
		createdBy: quality.id,
		instructionIds: [ins.id],
		checkId,
		practicalRequired: true,
		checklistId
	});
	// The trainer holds a valid certificate for the process, so they may sign it off.
	await insertCertificate(trainer.id, processId, ruleId);
});

async function answerAttempt(page: Page, correct: boolean) {
	const questions = page.locator('fieldset');
	await expect(questions).toHaveCount(2);
	for (let i = 0; i < 2; i++) {
		const q = questions.nth(i);
		const prompt = (await q.locator('p').first().textContent()) ?? '';
		const m = /([\d,]+) bumps, ([\d.,]+) MPa/.exec(prompt);
		if (m) {
			// The answer key comes from the calculator code: the test asks the same calculator.
			const r = runCalculator('bond-force', {
				basis: 'bump',
				bumpWidthUm: 18,
				bumpLengthUm: 95,
				bumpCount: Number(m[1].replace(/,/g, '')),
				pressureMPa: Number(m[2].replace(/,/g, ''))
			});
			if (!r.ok) throw new Error(r.error);
			const forceN = r.outputs.forceN;
			await q.getByLabel('Your answer').fill(correct ? forceN.toFixed(1) : '1');
		} else {
			await q.getByLabel(correct ? 'True' : 'False').check();
		}
	}
	await page.getByRole('button', { name: 'Submit answers' }).click();
}

test('operator certifies: acknowledge, fail, cool-down, pass, practical, certificate PDF', async ({
	browser
}) => {
	test.setTimeout(COOLDOWN_MIN * 60_000 + 120_000);
	const op = await (await browser.newContext({ acceptDownloads: true })).newPage();
	await signInPage(op, operator);

	// Acknowledge the revision in force with the operator's own password.
	await op.goto(`/instructions/${docNumber}/acknowledge`);
	await op.getByRole('button', { name: 'Acknowledge rev A' }).click();
	await expect(op.getByRole('alert').first()).toContainText('Tick the box');
	await op.getByLabel(/I have read and understood/).check();
	await op.getByLabel('Your PIN or password').fill(operator.password);
	await op.getByRole('button', { name: 'Acknowledge rev A' }).click();
	await expect(op.getByText(/You acknowledged rev A/)).toBeVisible();

	// First attempt: wrong answers, not passed, and the cool-down holds the next one back.
	await op.goto(`/training/checks/${checkCode}`);
	await op.getByRole('button', { name: /Start the knowledge check/ }).click();
	await expect(op).toHaveURL(/\/training\/attempts\/\d+$/);
	const firstAttemptUrl = op.url();
	await answerAttempt(op, false);
	await expect(op.getByRole('status')).toContainText('Not passed');
	await expect(op.getByText('Questions to look at again')).toBeVisible();
	await op.goto(`/training/checks/${checkCode}`);
	await expect(op.getByText(/You can try again from/)).toBeVisible();

	// The answer keys are nowhere in what the browser received.
	const html = await (await op.request.get(firstAttemptUrl)).text();
	expect(html).not.toMatch(/answerKey|"correct"/);

	// Wait out the cool-down, then pass.
	await op.waitForTimeout(COOLDOWN_MIN * 60_000 + 1_500);
	await op.reload();
	await op.getByRole('button', { name: /Start the knowledge check/ }).click();
	await expect(op).toHaveURL(/\/training\/attempts\/\d+$/);
	expect(op.url()).not.toBe(firstAttemptUrl);
	await answerAttempt(op, true);
	await expect(op.getByRole('status')).toContainText('Passed · 100 %');

	// The trainer observes at the bonder and signs.
	const tr = await (await browser.newContext()).newPage();
	await signInPage(tr, trainer);
	await tr.goto('/signoffs/new');
	await tr.getByLabel(/Find the operator/).fill(operator.badge!);
	await tr.getByRole('button', { name: 'Find' }).click();
	await tr.getByLabel(new RegExp(operator.displayName.replace(/[/]/g, '.'))).check();
	const checklist = await tr.locator('option', { hasText: processCode }).textContent();
	await tr.getByLabel('Checklist').selectOption({ label: checklist! });
	await tr.getByRole('button', { name: 'Start observing' }).click();
	await expect(tr).toHaveURL(/\/signoffs\/\d+$/);
	await tr.getByLabel('Pass').first().check();
	// A photo over 10 MB is refused as soon as it is chosen: nothing is sent while it is there.
	const photo = tr.getByLabel('Photo (optional)').first();
	await photo.setInputFiles({
		name: 'too-big.jpg',
		mimeType: 'image/jpeg',
		buffer: Buffer.alloc(11 * 1024 * 1024)
	});
	expect(await photo.evaluate((el: HTMLInputElement) => el.validationMessage)).toBe(
		'This file is 11.0 MB; images may be at most 10 MB.'
	);
	expect(await photo.evaluate((el: HTMLInputElement) => el.form!.checkValidity())).toBe(false);
	const tooLarge = tr.getByText('This file is 11.0 MB; images may be at most 10 MB.');
	await expect(tooLarge).toBeVisible();
	let posted = 0;
	const countPosts = (r: import('@playwright/test').Request) => {
		if (r.method() === 'POST') posted++;
	};
	tr.on('request', countPosts);
	await tr.getByRole('button', { name: 'Save step 1' }).click();
	await tr.waitForTimeout(300);
	tr.off('request', countPosts);
	expect(posted).toBe(0);
	await photo.setInputFiles([]);
	expect(await photo.evaluate((el: HTMLInputElement) => el.validationMessage)).toBe('');
	await expect(tooLarge).toBeHidden();
	// Saving a step reloads the page data; sign only once that has landed.
	await Promise.all([
		tr.waitForResponse((r) => r.request().method() === 'POST' && /\/signoffs\/\d+/.test(r.url())),
		tr.getByRole('button', { name: 'Save step 1' }).click()
	]);
	// "Saved" shows once the page data has been loaded again (networkidle, reached long before,
	// would not wait for that reload).
	await expect(tr.getByRole('status').filter({ hasText: 'Saved' })).toBeVisible();
	await tr.getByLabel('Your password (re-enter to sign)').fill(trainer.password);
	await tr.getByRole('button', { name: 'Sign the sign-off' }).click();
	await expect(tr.getByText(/countersign/i).first()).toBeVisible();

	// The operator countersigns; the certificate is issued at once.
	await op.goto('/my-signoffs');
	await op
		.getByRole('link', { name: new RegExp(processCode) })
		.first()
		.click();
	await op.getByLabel('Your PIN or password').fill(operator.password);
	await op.getByRole('button', { name: 'Countersign' }).click();
	await expect(op.getByText(/Countersigned|Complete/).first()).toBeVisible();
	await op.goto('/certificates');
	const row = op.getByRole('listitem').filter({ hasText: processName });
	await expect(row).toContainText('Valid');

	// Download the PDF as a user would and read it back.
	const downloadPromise = op.waitForEvent('download');
	await row.getByRole('link', { name: 'Download PDF' }).click();
	const download = await downloadPromise;
	const dir = await mkdtemp(path.join(tmpdir(), 'padbridge-e2e-cert-'));
	try {
		const file = path.join(dir, 'certificate.pdf');
		await download.saveAs(file);
		const read = await readPdf(new Uint8Array(await readFile(file)), dir, 'read');
		expect(read.text).toContain(operator.displayName);
		expect(read.text).toContain(processName);
		expect(read.text).toContain(docNumber);
		expect(read.text).toMatch(/KBO2-E2E\w+-\d{4}-\d{6}/);
		expect(await ocrLine(read.namePngPath, 'vie+chi_sim')).toBe(operator.displayName);
		const url = await decodeQr(read.pngPath);
		expect(url).toMatch(/\/verify\/[A-Za-z0-9_-]{43}$/);

		// The QR opens the public verification page, signed out.
		const anon = await (await browser.newContext()).newPage();
		await anon.goto(new URL(url!).pathname);
		await expect(anon.getByRole('heading', { level: 1 })).toHaveText(processName);
		await expect(anon.getByText('Valid')).toBeVisible();
		await expect(anon.getByText(operator.badge!)).toHaveCount(0);
		await expect(anon.getByText(operator.email)).toHaveCount(0);
	} finally {
		await rm(dir, { recursive: true, force: true });
	}
});
