// Training histories in a real browser: an operator reaches "My records" from the header and
// downloads the JSON; HR finds a person, opens the history and downloads the PDF; the gate log page
// shows the audit chain's state after a verification.
import { readFile } from 'node:fs/promises';
import { expect, test, type Page } from '@playwright/test';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../scripts/demo-accounts.js';

const operator = DEMO_ACCOUNTS.find((a) => a.role === 'operator')!;

async function signInWithBadge(page: Page) {
	await page.goto('/signin');
	const panel = page.getByRole('tabpanel', { name: 'Badge + PIN' });
	await panel.getByLabel('Badge number').fill(operator.badge!);
	await panel.getByLabel('PIN').fill(operator.pin!);
	await panel.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/signin/);
}

async function signInWithPassword(page: Page, email: string) {
	await page.goto('/signin');
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByLabel('E-mail', { exact: true }).fill(email);
	await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).last().click();
	await expect(page).not.toHaveURL(/\/signin/);
}

test('an operator opens My records from the header and downloads the JSON', async ({
	page
}, testInfo) => {
	await signInWithBadge(page);
	await page.getByRole('banner').getByRole('link', { name: 'My records' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'My records' })).toBeVisible();
	await expect(page.getByRole('heading', { level: 2, name: 'Certificates' })).toBeVisible();
	await page.screenshot({ path: testInfo.outputPath('my-records.png'), fullPage: true });

	const [download] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('link', { name: 'JSON' }).click()
	]);
	expect(download.suggestedFilename()).toMatch(/^training-history-.+\.json$/);
	const body = JSON.parse(await readFile((await download.path())!, 'utf8'));
	expect(body.format).toBe('padbridge.training-history');
	expect(body.person.displayName).toBe(operator.name);
});

test('HR finds a person and downloads the history PDF', async ({ page }, testInfo) => {
	await signInWithPassword(page, 'hr@kbo2.example');
	await page.goto('/records/people');
	await page.getByLabel('Name, employee no. or badge').fill(operator.badge!);
	await page.getByRole('button', { name: 'Find' }).click();
	await page.getByRole('link', { name: operator.name, exact: true }).click();
	await expect(page.getByRole('heading', { level: 1, name: operator.name })).toBeVisible();
	await page.screenshot({ path: testInfo.outputPath('history.png'), fullPage: true });

	const [download] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('link', { name: 'PDF' }).click()
	]);
	expect(download.suggestedFilename()).toMatch(/^training-history-.+\.pdf$/);
	const bytes = await readFile((await download.path())!);
	expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
});

test('quality verifies the audit chain on the gate log page', async ({ page }, testInfo) => {
	await signInWithPassword(page, 'quality@kbo2.example');
	await page.goto('/records/logs');
	await page.getByRole('button', { name: 'Verify the chain now' }).click();
	await expect(page.getByText(/Chain verified up to seq \d+/)).toBeVisible();
	await expect(page.getByRole('link', { name: /Audit trail CSV/ })).toBeVisible();
	await page.screenshot({ path: testInfo.outputPath('logs.png'), fullPage: true });
});
