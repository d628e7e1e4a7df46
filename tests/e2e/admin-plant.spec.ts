import { expect, test, type Page } from '@playwright/test';

const PASSWORD = 'kestrel-bay-demo-2026';
// Unique per run, so reruns against the same database do not collide.
const RUN = Date.now().toString(36).slice(-4).toUpperCase();
const LINE = `E${RUN}`;

async function signIn(page: Page, email: string) {
	await page.goto('/signin');
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByLabel('E-mail', { exact: true }).fill(email);
	await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).last().click();
	await expect(page).not.toHaveURL(/\/signin/);
}

/** Picks a line in the station form by its code (option texts read "L2 · Line 2 · ..."). */
async function chooseLine(page: Page, code: string) {
	const select = page.getByLabel('Line', { exact: true });
	const value = await select
		.locator('option', { hasText: `${code} · ` })
		.first()
		.getAttribute('value');
	await select.selectOption(value!);
}

test.describe.configure({ mode: 'serial' });

test('admin adds a line and a station with two processes and finds them on the plant map', async ({
	page
}) => {
	await signIn(page, 'admin@kbo2.example');
	await page.goto('/admin/plant');
	await page.getByRole('link', { name: 'Add a line' }).click();
	await page.getByLabel('Line code').fill(LINE);
	await page.getByLabel('Name').fill('E2E line · COF');
	await page.getByRole('button', { name: 'Add line' }).click();
	await expect(page.getByText('Line added')).toBeVisible();

	await page.goto('/admin/plant/stations/new');
	await page
		.getByLabel('Line', { exact: true })
		.selectOption({ label: `${LINE} · E2E line · COF` });
	await page.getByLabel('Station code').fill(`${LINE.toLowerCase()}-fog-01`);
	await page.getByLabel('Name', { exact: true }).fill('E2E FOG bonder');
	await page.getByLabel('Qualified people wanted per shift').fill('3');
	await page.getByRole('checkbox', { name: /FOG-PB/ }).check();
	await page.getByRole('checkbox', { name: /FOG-MB/ }).check();
	await page.getByRole('button', { name: 'Add station' }).click();
	await expect(page.getByRole('heading', { name: `Station ${LINE}-FOG-01` })).toBeVisible();
	await expect(page.getByText('Station added')).toBeVisible();

	await page.getByRole('link', { name: 'plant map', exact: true }).click();
	const line = page.getByRole('region', { name: new RegExp(`^${LINE}`) });
	await expect(line.getByRole('link', { name: `${LINE}-FOG-01` })).toBeVisible();
	const needs = line.getByRole('list', { name: `Processes ${LINE}-FOG-01 requires` });
	await expect(needs.getByRole('listitem')).toHaveCount(2);
	await expect(needs).toContainText('FOG-PB');
	await expect(needs).toContainText('FOG-MB');
	await expect(line).toContainText('3 qualified wanted per shift');

	// Out of the way of other tests: deactivate station and line again (both kept as history).
	await line.getByRole('link', { name: `${LINE}-FOG-01` }).click();
	await page.getByLabel('Reason (kept in the audit trail)').fill('end-to-end test finished');
	await page.getByRole('button', { name: 'Deactivate' }).click();
	await expect(page.getByRole('heading', { name: 'Reactivate this station' })).toBeVisible();
	await page.goto('/admin/plant');
	await page
		.getByRole('region', { name: new RegExp(`^${LINE}`) })
		.getByRole('link', { name: 'Edit line' })
		.click();
	await page.getByLabel('Reason (kept in the audit trail)').fill('end-to-end test finished');
	await page.getByRole('button', { name: 'Deactivate' }).click();
	await expect(page.getByRole('heading', { name: 'Reactivate this line' })).toBeVisible();
	await page.goto('/admin/plant');
	await expect(page.getByRole('region', { name: new RegExp(`^${LINE}`) })).toHaveCount(0);
	await expect(page.getByRole('link', { name: LINE, exact: true })).toBeVisible();
});

test('a bad station code gets a field error and keeps what was typed', async ({ page }) => {
	await signIn(page, 'admin@kbo2.example');
	await page.goto('/admin/plant/stations/new');
	await chooseLine(page, 'L2');
	await page.getByLabel('Station code').fill('L2 FOG 3');
	await page.getByLabel('Name', { exact: true }).fill('Bonder with a typo in its code');
	await page.getByRole('checkbox', { name: /FOG-MB/ }).check();
	await page.getByRole('button', { name: 'Add station' }).click();

	await expect(page.getByText('Use line-kind-number, e.g. L2-FOG-03')).toBeVisible();
	await expect(page.getByLabel('Station code')).toHaveAttribute('aria-invalid', 'true');
	await expect(page.getByLabel('Station code')).toHaveValue('L2 FOG 3');
	await expect(page.getByLabel('Name', { exact: true })).toHaveValue(
		'Bonder with a typo in its code'
	);
	await expect(page.getByRole('checkbox', { name: /FOG-MB/ })).toBeChecked();

	// A code that is taken comes back from the server as a field error too (409), still keeping
	// the name.
	await page.getByLabel('Station code').fill('L2-FOG-03');
	await page.getByRole('button', { name: 'Add station' }).click();
	await expect(page.getByText('Station L2-FOG-03 already exists')).toBeVisible();
	await expect(page.getByLabel('Name', { exact: true })).toHaveValue(
		'Bonder with a typo in its code'
	);
});

test('the station form works without JavaScript', async ({ browser }) => {
	const context = await browser.newContext({ javaScriptEnabled: false });
	const page = await context.newPage();
	await page.goto('/signin');
	// Without JavaScript both sign-in forms show; use the e-mail one.
	await page.getByLabel('E-mail', { exact: true }).fill('admin@kbo2.example');
	await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).last().click();
	await page.goto('/admin/plant/stations/new');
	await chooseLine(page, 'L1');
	await page.getByLabel('Station code').fill('L2-COG-09');
	await page.getByLabel('Name', { exact: true }).fill('Typed without scripts');
	await page.getByRole('checkbox', { name: /COG-MB/ }).check();
	await page.getByRole('button', { name: 'Add station' }).click();
	await expect(page.getByText('Stations on line L1 have codes starting L1-')).toBeVisible();
	await expect(page.getByLabel('Name', { exact: true })).toHaveValue('Typed without scripts');
	await expect(page.getByRole('checkbox', { name: /COG-MB/ })).toBeChecked();
	await context.close();
});

test('quality filters the audit trail by action and verifies the chain', async ({ page }) => {
	await signIn(page, 'quality@kbo2.example');
	await page
		.getByRole('navigation', { name: 'Main' })
		.getByRole('link', { name: 'Audit trail' })
		.click();
	await expect(page.getByRole('heading', { name: 'Audit trail' })).toBeVisible();

	await page.getByLabel('Action').selectOption('station.create');
	await page.getByRole('button', { name: 'Apply filter' }).click();
	await expect(page).toHaveURL(/action=station\.create/);
	const rows = page
		.getByRole('table', { name: 'Audit events, newest first' })
		.locator('tbody > tr');
	await expect(rows.first()).toContainText(`${LINE}-FOG-01`);
	for (const action of await rows.locator('td[data-label="Action"]').allTextContents()) {
		expect(action.trim()).toBe('station.create');
	}
	// The old → new values open per row.
	await rows
		.first()
		.getByText(/(values?|changed)$/)
		.click();
	await expect(rows.first().getByRole('table')).toContainText('processes');

	await page.getByRole('button', { name: 'Verify chain' }).click();
	await expect(page.getByText('Chain intact')).toBeVisible();
	await expect(page.getByText(/All [\d,]+ rows checked/)).toBeVisible();
	// The filter is still applied after verifying.
	await expect(page.getByLabel('Action')).toHaveValue('station.create');
});

test('quality cannot open the plant admin', async ({ page }) => {
	await signIn(page, 'quality@kbo2.example');
	const res = await page.goto('/admin/plant');
	expect(res?.status()).toBe(403);
});
