import { expect, test, type Page } from '@playwright/test';

// The demo operator (scripts/demo-accounts.js).
async function signInAsOperator(page: Page, back: string) {
	await page.goto(`/signin?redirectTo=${encodeURIComponent(back)}`);
	const panel = page.getByRole('tabpanel', { name: 'Badge + PIN' });
	await panel.getByLabel('Badge number').fill('KB-10421');
	await panel.getByLabel('PIN').fill('204816');
	await panel.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL((url) => url.pathname === back);
}

/** Console errors include Content-Security-Policy refusals, which must not happen on these pages. */
function collectConsoleErrors(page: Page): string[] {
	const errors: string[] = [];
	page.on('console', (message) => {
		if (message.type() === 'error') errors.push(message.text());
	});
	page.on('pageerror', (error) => errors.push(error.message));
	return errors;
}

test('an operator finds the help pages from the main menu', async ({ page }, testInfo) => {
	const errors = collectConsoleErrors(page);
	await signInAsOperator(page, '/');
	await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Help' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Help' })).toBeVisible();
	for (const title of [
		'How to write a work instruction',
		'Calculator blocks',
		'Safety notes for bonding work',
		'Shop-floor terminals, keyboard and badge scanner',
		'Training histories, my records, gate log and audit trail exports',
		'Retention, legal holds and leavers',
		'Notices by e-mail and the mail outbox'
	]) {
		await expect(page.getByRole('link', { name: new RegExp(title) })).toBeVisible();
	}
	await page.screenshot({ path: testInfo.outputPath('help-index-desktop.png'), fullPage: true });
	expect(errors).toEqual([]);
});

test('the writing guide shows highlighted code and a rendered sample instruction', async ({
	page
}, testInfo) => {
	const errors = collectConsoleErrors(page);
	await signInAsOperator(page, '/help/writing-instructions');
	await expect(
		page.getByRole('heading', { level: 1, name: 'How to write a work instruction' })
	).toBeVisible();
	// Code from the mdsvex page, highlighted at build time.
	await expect(page.locator('pre.shiki').first()).toBeVisible();

	const sample = page.getByRole('figure', { name: /A main bond section/ });
	await expect(sample.getByText('What the operator sees')).toBeVisible();
	await expect(sample.getByRole('note').filter({ hasText: 'Caution' }).first()).toContainText(
		'Hot head'
	);
	await expect(sample.locator('ol.steps > li')).toHaveCount(4);
	const photo = sample.getByRole('img', { name: /Even indentation on all nine bumps/ });
	await photo.scrollIntoViewIfNeeded();
	// Loaded (lazily), from our own origin, so the CSP let it through.
	await expect
		.poll(() => photo.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth))
		.toBeGreaterThan(0);
	await expect(
		sample.getByText('Accept: every bump shows even, well-formed marks', { exact: true })
	).toBeVisible();
	await expect(sample.locator('pre.lang-ini .tok-keyword').first()).toHaveText('head_temp_c');

	await page.screenshot({ path: testInfo.outputPath('writing-desktop.png'), fullPage: true });
	await page.setViewportSize({ width: 390, height: 844 });
	await page.screenshot({ path: testInfo.outputPath('writing-390.png'), fullPage: true });
	expect(errors).toEqual([]);
});

test('calculator examples keep a working link to the calculator', async ({ page }, testInfo) => {
	await signInAsOperator(page, '/help/calculator-blocks');
	const example = page.getByRole('figure', { name: /COG on the 1.4-inch watch panel/ });
	// The live calculator replaces the block on screen; the plain fallback stays in the page (for
	// print and for terminals where the component cannot load) with a link carrying the presets.
	await expect(example.locator('.calc-live')).toBeVisible();
	const href = await example.locator('.calc-fallback-link a').getAttribute('href');
	expect(href).toMatch(/^\/calculators\/bond-force\?basis=bump&bumpCount=1280&/);
	await expect(page.getByRole('rowheader', { name: 'bumpWidthUm' }).first()).toBeVisible();
	await page.setViewportSize({ width: 390, height: 844 });
	await page.screenshot({ path: testInfo.outputPath('calculators-390.png'), fullPage: true });
});

test('an unknown help page is a 404', async ({ page }) => {
	await signInAsOperator(page, '/help');
	const response = await page.goto('/help/no-such-page');
	expect(response?.status()).toBe(404);
});
