// The station kiosk in a real browser: an admin pairs the terminal with the station's gate key,
// an operator's badge arrives as a keyboard wedge types it (characters, then Enter), the green
// ALLOW panel shows, and after ten seconds the screen is back at the scan prompt.
import { expect, test } from '@playwright/test';
import { closeDbHelpers, createTestPerson, type TestPerson } from '../helpers/db';
import {
	insertCertificate,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';
import { createApiKey } from '../../src/lib/server/apikeys';
import { pool } from '../../src/lib/server/db';

let operator: TestPerson;
let station: { id: number; code: string };
let key: string;

test.beforeAll(async () => {
	const admin = await createTestPerson({ roles: ['admin'] });
	operator = await createTestPerson({ roles: ['operator'], withEmail: false });
	const proc = await makeProcess();
	const ruleId = await makeRule({ processId: proc.id, createdBy: admin.id, instructionIds: [] });
	station = await makeStation([proc.id]);
	await insertCertificate(operator.id, proc.id, ruleId, {
		expiresAt: new Date(Date.now() + 200 * 86_400_000)
	});
	key = (
		await createApiKey(
			{ id: admin.id, label: admin.displayName },
			{ name: 'e2e kiosk', scope: 'gate', stationId: station.id }
		)
	).key;
});
test.afterAll(async () => {
	await closeDbHelpers();
	await pool.end();
});

test('pair the kiosk, scan a badge with Enter, see ALLOW, see it clear', async ({ page }) => {
	await page.goto(`/stations/${station.code}/gate`);
	await expect(page.getByRole('heading', { name: 'Pair this terminal' })).toBeVisible();
	await page.screenshot({ path: 'test-results/kiosk-pair.png' });
	await page.getByLabel('Station gate API key').fill(key);
	await page.getByRole('button', { name: 'Pair terminal' }).click();

	const badge = page.getByLabel('Scan your badge');
	await expect(badge).toBeFocused();
	// A keyboard-wedge scanner: the badge's characters as key presses, then Enter.
	await page.keyboard.type(operator.badge!, { delay: 15 });
	await page.keyboard.press('Enter');

	const panel = page.locator('[data-decision]');
	await expect(panel).toHaveAttribute('data-decision', 'allow');
	await expect(panel).toContainText('ALLOW');
	await expect(panel.getByText(operator.displayName)).toBeVisible();
	await page.screenshot({ path: 'test-results/kiosk-allow.png', fullPage: true });
	// The input is empty and keeps the focus for the next person.
	await expect(badge).toHaveValue('');
	await expect(badge).toBeFocused();

	await expect(panel).toBeHidden({ timeout: 13_000 });
	await expect(page.getByLabel('Scan your badge')).toBeVisible();

	await page.getByRole('button', { name: 'Unpair terminal' }).click();
	await expect(page.getByRole('heading', { name: 'Pair this terminal' })).toBeVisible();
});

test('a line lead sees the supervised-runs page with the grant form', async ({ page }) => {
	await page.goto('/signin');
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByLabel('E-mail', { exact: true }).fill('lead.l1@kbo2.example');
	await page.getByLabel('Password', { exact: true }).fill('kestrel-bay-demo-2026');
	await page.getByRole('button', { name: 'Sign in' }).last().click();
	await expect(page).not.toHaveURL(/\/signin/);
	await page.getByRole('link', { name: 'Supervised runs' }).first().click();
	await expect(page.getByRole('heading', { name: 'Supervised runs' })).toBeVisible();
	// Nothing chosen: field errors, and the reason typed stays in the form. (Runs granted by other
	// tests may be listed below with their own "End now" reason fields.)
	const grant = page.locator('form[action="?/grant"]');
	await grant.getByLabel('Reason').fill('New FOG head fitted');
	await page.getByRole('button', { name: 'Grant supervised run' }).click();
	await expect(page.getByText('Choose the person who will run the station.')).toBeVisible();
	await expect(grant.getByLabel('Reason')).toHaveValue('New FOG head fitted');
	await page.screenshot({ path: 'test-results/supervised-runs.png', fullPage: true });
});
