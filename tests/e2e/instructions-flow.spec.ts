import { expect, test } from '@playwright/test';
import {
	createTestPerson,
	makeInstruction,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { signInPage } from '../helpers/instruction-browser';

let trainer: TestPerson;
let quality: TestPerson;
let operator: TestPerson;
let doc: string;

test.beforeAll(async () => {
	trainer = await createTestPerson(['trainer']);
	quality = await createTestPerson(['quality']);
	operator = await createTestPerson(['operator']);
	doc = (
		await makeInstruction(
			trainer,
			quality,
			[{ source: '# Purpose\n\nWipe the pads.\n\n## Steps\n\n1. Wipe once.\n' }],
			{
				title: 'Pad wipe for the flow test'
			}
		)
	).docNumber;
});

test('draft → review → approve → effective, as trainer, quality and operator', async ({
	browser
}) => {
	// Trainer opens revision B, writes, lets autosave run, and submits.
	const t = await (await browser.newContext()).newPage();
	await signInPage(t, trainer);
	await t.goto(`/instructions/${doc}`);
	await expect(t.getByTestId('in-force')).toContainText('Rev A');
	await t.getByRole('button', { name: 'Start next revision' }).click();
	await expect(t).toHaveURL(new RegExp(`/instructions/${doc}/revisions/B/edit$`));
	const editor = t.getByRole('textbox', { name: 'Markdown' });
	await editor.fill(
		'# Purpose\n\nWipe the pads.\n\n## Steps\n\n1. Wipe once.\n2. Wipe again with a new wipe (flowtest).\n'
	);
	await expect(t.getByTestId('preview')).toContainText('Wipe again with a new wipe (flowtest)');
	await expect(t.getByTestId('save-state')).toContainText('Saved at', { timeout: 10_000 });
	await t.getByLabel('What changed').fill('Second wipe with a new wipe.');
	await t.getByLabel('Why').fill('Fibres found on pads.');
	await t.getByLabel('What it asks of operators').selectOption('acknowledge');
	await t.getByRole('button', { name: 'Submit for review' }).click();
	await expect(t).toHaveURL(new RegExp(`/instructions/${doc}/revisions/B$`));
	await expect(t.getByText('In review').first()).toBeVisible();

	// Quality reviews the diff and signs "approved", effective at once.
	const q = await (await browser.newContext()).newPage();
	await signInPage(q, quality);
	await q.goto(`/instructions/${doc}/revisions/B/review`);
	await expect(q.getByRole('region', { name: 'Revision under review' })).toContainText('flowtest');
	await q.getByRole('button', { name: 'Source line diff' }).click();
	await expect(q.getByTestId('source-diff')).toContainText(
		'2. Wipe again with a new wipe (flowtest).'
	);
	await q.getByLabel('Approved — this revision may be put in force').check();
	await q.getByLabel(/Effective date/).fill('');
	await q.getByLabel('Your password (re-enter to sign)').fill('wrong password');
	await q.getByRole('button', { name: 'Sign', exact: true }).click();
	await expect(q.getByText('Wrong password.')).toBeVisible();
	await q.getByLabel('Your password (re-enter to sign)').fill(quality.password);
	await q.getByRole('button', { name: 'Sign', exact: true }).click();
	await expect(q).toHaveURL(new RegExp(`/instructions/${doc}/revisions/B$`));
	await expect(q.locator('main header').first()).toContainText(/✓\s*Effective/);
	await expect(q.getByText(`${quality.displayName} — Approved`)).toBeVisible();

	// The operator now gets B at the point of use, and no way to A.
	const o = await (await browser.newContext()).newPage();
	await signInPage(o, operator, 'badge');
	await o.goto(`/instructions/${doc}`);
	await expect(o.getByTestId('in-force')).toContainText('Rev B');
	await expect(o.getByText('Wipe again with a new wipe (flowtest).')).toBeVisible();
	const res = await o.goto(`/instructions/${doc}/revisions/A`);
	expect(res?.status()).toBe(404);
	// The header search finds the new wording for the operator.
	await o.goto('/');
	await o.getByRole('combobox', { name: 'Search instructions' }).fill('flowtest');
	const option = o.getByRole('option').filter({ hasText: doc });
	await expect(option).toBeVisible();
	await o.getByRole('combobox', { name: 'Search instructions' }).press('ArrowDown');
	await expect(option).toHaveAttribute('aria-selected', 'true');
	await o.getByRole('combobox', { name: 'Search instructions' }).press('Enter');
	await expect(o).toHaveURL(new RegExp(`/instructions/${doc}$`));
});
