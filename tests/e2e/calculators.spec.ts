// Calculator pages in Chromium: live results computed by the registry code, the share link, field
// errors, a form without JavaScript, the charts, and the API key screen.
import { expect, test, type Locator, type Page } from '@playwright/test';
import { runCalculator } from '../../src/lib/calculators/registry';
import { formatNumber } from '../../src/lib/calculators/format';

// The demo sign-ins of scripts/demo-accounts.js.
const PASSWORD = 'kestrel-bay-demo-2026';

async function signIn(page: Page, email: string, redirectTo: string) {
	await page.goto(`/signin?redirectTo=${encodeURIComponent(redirectTo)}`);
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByRole('textbox', { name: 'E-mail' }).fill(email);
	await page.getByRole('textbox', { name: 'Password' }).fill(PASSWORD);
	await page
		.getByRole('tabpanel', { name: 'E-mail + password' })
		.getByRole('button', { name: 'Sign in' })
		.click();
	await page.waitForURL((url) => url.pathname === redirectTo);
}

/** A result on a calculator page, by its label (with the unit, when it has one). */
const output = (scope: Page | Locator, name: string) =>
	scope.getByRole('status', { name, exact: true });

/** Force in N as the registry computes it for bump inputs and a pressure. */
function expectedForceN(bumpCount: number, widthUm: number, lengthUm: number, pressureMPa: number) {
	const result = runCalculator('bond-force', {
		basis: 'bump',
		bumpCount,
		bumpWidthUm: widthUm,
		bumpLengthUm: lengthUm,
		pressureMPa
	});
	if (!result.ok) throw new Error(result.error);
	return result.outputs.forceN;
}

test.describe('calculators', () => {
	test.use({ permissions: ['clipboard-read', 'clipboard-write'] });

	test('bond force: live result equals the registry, share link and field errors', async ({
		page,
		browser
	}) => {
		await signIn(page, 'trainer@kbo2.example', '/calculators');
		await expect(page.getByRole('heading', { name: 'Calculators', level: 1 })).toBeVisible();
		await page.getByRole('link', { name: /Bond force/ }).click();
		await expect(page.getByRole('heading', { name: 'Bond force', level: 1 })).toBeVisible();
		await expect(page.getByText('Results are planning figures.').first()).toBeVisible();

		await page.getByLabel('Area basis').selectOption('bump');
		await page.getByLabel('Bump count', { exact: true }).fill('1000');
		await page.getByLabel('Bump width', { exact: true }).fill('18');
		await page.getByLabel('Bump length', { exact: true }).fill('90');
		await page.getByLabel('Pressure', { exact: true }).fill('60');

		const force = output(page, 'Force (N)');
		const first = expectedForceN(1000, 18, 90, 60);
		// 1000 × 18 µm × 90 µm × 60 MPa = 97.2 N (arithmetic)
		expect(first).toBeCloseTo(97.2, 10);
		await expect(force).toHaveText(formatNumber(first, 4));
		expect(Number(await force.getAttribute('data-value'))).toBe(first);

		await page.getByLabel('Pressure', { exact: true }).fill('75');
		const second = expectedForceN(1000, 18, 90, 75);
		await expect(force).toHaveText(formatNumber(second, 4));
		expect(Number(await force.getAttribute('data-value'))).toBe(second);

		// Share link: copied to the clipboard and shown, and it reopens the same inputs.
		await page.getByRole('button', { name: 'Share link' }).click();
		const shared = await page.getByLabel('Shared link').inputValue();
		expect(shared).toContain('/calculators/bond-force?');
		expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(shared);
		await expect(page.getByRole('link', { name: 'Link to these inputs' })).toHaveAttribute(
			'href',
			new URL(shared).pathname + new URL(shared).search
		);

		const other = await page.context().newPage();
		await other.goto(shared);
		await expect(other.getByLabel('Bump count', { exact: true })).toHaveValue('1000');
		await expect(other.getByLabel('Bump width', { exact: true })).toHaveValue('18');
		await expect(other.getByLabel('Bump length', { exact: true })).toHaveValue('90');
		await expect(other.getByLabel('Pressure', { exact: true })).toHaveValue('75');
		await expect(output(other, 'Force (N)')).toHaveText(formatNumber(second, 4));
		await other.close();

		// Copy result puts the inputs, results and caution on the clipboard.
		await page.getByRole('button', { name: 'Copy result' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'Result copied.' })).toBeVisible();
		const copied = await page.evaluate(() => navigator.clipboard.readText());
		expect(copied).toContain(`Force: ${formatNumber(second, 4, { plain: true })} N`);
		expect(copied).toContain('validated recipe govern');

		// The server renders the same result from the link, without JavaScript.
		const noScript = await browser.newContext({
			javaScriptEnabled: false,
			storageState: await page.context().storageState()
		});
		const plain = await noScript.newPage();
		await plain.goto(shared);
		await expect(output(plain, 'Force (N)')).toHaveText(formatNumber(second, 4));
		await plain.getByLabel('Pressure', { exact: true }).fill('50');
		await plain.getByRole('button', { name: 'Calculate' }).click();
		await expect(plain).toHaveURL(/pressureMPa=50/);
		await expect(output(plain, 'Force (N)')).toHaveText(
			formatNumber(expectedForceN(1000, 18, 90, 50), 4)
		);
		await noScript.close();

		// The calc block for an instruction, mounted from its text as instructions will mount it.
		await page.getByText('Use in an instruction').click();
		const block = page.getByLabel('Calculator block for an instruction');
		await expect(block).toContainText('```calc bond-force');
		await expect(block).toContainText('pressureMPa: 75');
		const embedded = page.getByRole('region', { name: 'Calculator: Bond force' });
		await expect(embedded.getByLabel('Pressure', { exact: true })).toHaveValue('75');
		await expect(output(embedded, 'Force (N)')).toHaveText(formatNumber(second, 4));
		await embedded.getByLabel('Pressure', { exact: true }).fill('60');
		await expect(output(embedded, 'Force (N)')).toHaveText(formatNumber(first, 4));
		await expect(embedded.getByText('Results are planning figures.')).toBeVisible();
		await page.getByText('Use in an instruction').click();
		await expect(embedded).toHaveCount(0);

		// An invalid input shows its error next to the field, and no result.
		await page.getByLabel('Bump width', { exact: true }).fill('-5');
		await expect(page.getByText('Bump width must be greater than 0 µm')).toBeVisible();
		await expect(page.getByLabel('Bump width', { exact: true })).toHaveAttribute(
			'aria-invalid',
			'true'
		);
		await expect(page.getByText('No result yet')).toBeVisible();
		await expect(output(page, 'Force (N)')).toHaveCount(0);
		// What was typed stays.
		await expect(page.getByLabel('Bump width', { exact: true })).toHaveValue('-5');
	});

	test('charts: cure curve with an added segment, particle bars, pitch error; unit selects', async ({
		page
	}) => {
		await signIn(page, 'trainer@kbo2.example', '/calculators/cure-degree');
		const chart = page.getByRole('img', { name: 'Degree of cure against time' });
		await expect(chart).toBeVisible();
		const before = await output(page, 'Degree of cure at the end').getAttribute('data-value');
		await page.getByRole('button', { name: 'Add segment' }).click();
		await expect(page.getByLabel('Duration of segment 3')).toHaveValue('12');
		const after = await output(page, 'Degree of cure at the end').getAttribute('data-value');
		expect(Number(after)).toBeGreaterThan(Number(before));
		await page.getByRole('button', { name: 'Remove segment 1' }).click();
		await expect(page.getByLabel('Duration of segment 3')).toHaveCount(0);

		await page.goto('/calculators/particle-capture');
		await expect(page.getByRole('img', { name: 'Particles captured per bump' })).toBeVisible();
		await expect(page.getByText('k_min = 3').first()).toBeVisible();

		await page.goto('/calculators/pitch-compensation');
		await expect(
			page.getByRole('img', { name: 'Pitch error across the pad row (uncompensated)' })
		).toBeVisible();
		await page.getByRole('button', { name: /Soda-lime glass/ }).click();
		await expect(page.getByLabel('Glass expansion coefficient', { exact: true })).toHaveValue('9');

		// Units: choosing another quantity moves both unit selects to units of that quantity.
		await page.goto('/calculators/units');
		await page.getByLabel('Quantity').selectOption('force');
		await expect(page.getByLabel('From unit')).toHaveValue('N');
		await expect(page.getByLabel('To unit')).toHaveValue('kgf');
		await page.getByLabel('To unit').selectOption('lbf');
		await page.getByLabel('Value', { exact: true }).fill('4.4482216152605');
		// 1 lbf = 4.4482216152605 N exactly (NIST SP 811)
		await expect(output(page, 'Converted value (lbf)')).toHaveText('1');
	});

	test('an unknown calculator is a 404', async ({ page }) => {
		await signIn(page, 'trainer@kbo2.example', '/calculators');
		const response = await page.goto('/calculators/solder-volume');
		expect(response?.status()).toBe(404);
	});
});

test('API keys: created once, shown once, used, revoked with a reason', async ({
	page,
	request
}) => {
	await signIn(page, 'admin@kbo2.example', '/admin/api-keys');
	await expect(page.getByRole('heading', { name: 'API keys', level: 1 })).toBeVisible();
	const name = `E2E MES ${Date.now()}`;
	await page.getByLabel('Name', { exact: true }).fill(name);
	await page.getByLabel('Scope').selectOption('calculators');
	await page.getByRole('button', { name: 'Create key' }).click();
	await expect(page.getByText('you will not see it again')).toBeVisible();
	const key = await page.getByLabel('New API key').inputValue();
	expect(key).toMatch(/^pbk_/);

	const call = () =>
		request.post('/api/v1/calculators/units', {
			headers: { authorization: `Bearer ${key}` },
			data: { quantity: 'force', value: 1, from: 'kgf', to: 'N' }
		});
	const ok = await call();
	expect(ok.status()).toBe(200);
	// 1 kgf = 9.80665 N exactly (NIST SP 811)
	expect((await ok.json()).outputs.value).toBe(9.80665);

	await page.reload();
	await expect(page.getByText('you will not see it again')).toHaveCount(0);
	const row = page.getByRole('row').filter({ hasText: name });
	await expect(row.getByText('Active')).toBeVisible();
	await row.getByText('Revoke…').click();
	await row.getByRole('button', { name: /Revoke key/ }).click();
	await expect(row.getByText(/Say why the key is revoked/)).toBeVisible();
	await row.getByLabel('Reason', { exact: true }).fill('End-to-end test is done with it');
	await row.getByRole('button', { name: /Revoke key/ }).click();
	await expect(page.getByText('Key revoked')).toBeVisible();
	await expect(page.getByRole('row').filter({ hasText: name }).getByText('Revoked')).toBeVisible();
	expect((await call()).status()).toBe(401);
});
