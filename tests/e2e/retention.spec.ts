import { expect, test, type Page } from '@playwright/test';
import { DEMO_PASSWORD } from '../../scripts/demo-accounts.js';

async function signInAsHr(page: Page, back: string) {
	await page.goto(`/signin?redirectTo=${encodeURIComponent(back)}`);
	await expect(page.getByRole('tablist', { name: 'How to sign in' })).toBeVisible();
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	const panel = page.getByRole('tabpanel', { name: 'E-mail + password' });
	await panel.getByLabel('E-mail', { exact: true }).fill('hr@kbo2.example');
	await panel.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
	await panel.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL((url) => url.pathname === back);
}

test('hr runs a dry run, reads its plan and gets a field error for an unknown person', async ({
	page
}, testInfo) => {
	await signInAsHr(page, '/records/retention');
	await expect(page.getByRole('heading', { level: 1, name: 'Retention' })).toBeVisible();
	await expect(page.getByRole('heading', { name: 'Not anonymised, on purpose' })).toBeVisible();
	await page.screenshot({ path: testInfo.outputPath('retention-page.png'), fullPage: true });

	await page.getByRole('button', { name: 'Dry run' }).click();
	await page.waitForURL(/\/records\/retention\/runs\/\d+$/);
	await expect(page.getByText('Dry run: nothing changed')).toBeVisible();
	await expect(page.getByRole('heading', { name: /People a run would anonymise/ })).toBeVisible();
	await page.screenshot({ path: testInfo.outputPath('retention-dry-run.png'), fullPage: true });

	await page.getByRole('link', { name: 'Back to retention' }).click();
	const hold = page.getByRole('form', { name: 'Place a legal hold' });
	await hold.getByLabel('Employee number').fill('NO-SUCH-1');
	await hold.getByLabel('Reason').fill('Customer audit 2026-11');
	await hold.getByRole('button', { name: 'Place legal hold' }).click();
	await expect(hold.getByText('No person has this employee number.')).toBeVisible();
	// What was typed stays in the form.
	await expect(hold.getByLabel('Employee number')).toHaveValue('NO-SUCH-1');
	await expect(hold.getByLabel('Reason')).toHaveValue('Customer audit 2026-11');
	await page.screenshot({ path: testInfo.outputPath('retention-hold-error.png'), fullPage: true });
});
