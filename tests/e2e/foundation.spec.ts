// The foundation in a real browser: each role's home, badge + PIN sign-in with a keyboard-wedge
// scanner, the 403 page, field errors that keep what was typed, and signing out.
import { expect, test, type Page } from '@playwright/test';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../scripts/demo-accounts.js';
import { navFor } from '../../src/lib/nav';
import { ROLE_LABELS, type Role } from '../../src/lib/roles';

const account = (role: Role) => DEMO_ACCOUNTS.find((a) => a.role === role)!;

/** Opens the sign-in page and waits until its script runs (the tabs appear only then). */
async function openSignIn(page: Page, path = '/signin') {
	await page.goto(path);
	await expect(page.getByRole('tablist', { name: 'How to sign in' })).toBeVisible();
}

async function signInWithPassword(page: Page, email: string, password: string) {
	await openSignIn(page);
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByLabel('E-mail', { exact: true }).fill(email);
	await page.getByLabel('Password', { exact: true }).fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
}

async function signInWithBadge(page: Page, badge: string, pin: string) {
	await openSignIn(page);
	await page.getByLabel('Badge number').fill(badge);
	await page.getByLabel('PIN', { exact: true }).fill(pin);
	await page.getByLabel('PIN', { exact: true }).press('Enter');
}

async function signInAs(page: Page, role: Role) {
	const a = account(role);
	if (a.email) await signInWithPassword(page, a.email, DEMO_PASSWORD);
	else await signInWithBadge(page, a.badge!, a.pin!);
	await expect(page.getByRole('heading', { level: 1, name: `Hello, ${a.name}` })).toBeVisible();
}

/** A card on the home screen that only this role's work brings. */
const ROLE_HOME: Record<Role, RegExp> = {
	admin: /^Plant set-up$/,
	quality: /^Latest audit events$/,
	trainer: /^Stations on your line$/,
	lead: /^Your crew on L1 \(\d+ people\)$/,
	hr: /^Active headcount$/,
	operator: /^Your stations$/
};

test.describe('each role signs in and sees its own home', () => {
	for (const role of Object.keys(ROLE_HOME) as Role[]) {
		test(role, async ({ page }) => {
			await signInAs(page, role);
			await expect(page).toHaveURL('/');
			await expect(page.getByRole('heading', { level: 2, name: ROLE_HOME[role] })).toBeVisible();
			// No other role's card.
			for (const [other, card] of Object.entries(ROLE_HOME)) {
				if (other === role || (role === 'admin' && other === 'quality')) continue;
				await expect(page.getByRole('heading', { level: 2, name: card })).toHaveCount(0);
			}
			// The navigation offers exactly what the role can use.
			const nav = page.getByRole('navigation', { name: 'Main' });
			await expect(nav.getByRole('link')).toHaveText(navFor([role]).map((n) => n.label));
			await expect(
				page.getByRole('banner').getByText(ROLE_LABELS[role], { exact: true })
			).toBeVisible();
		});
	}
});

test.describe('operators at a shared terminal', () => {
	test('sign in with badge + PIN', async ({ page }) => {
		const op = account('operator');
		await signInWithBadge(page, op.badge!, op.pin!);
		await expect(page.getByRole('heading', { level: 1, name: `Hello, ${op.name}` })).toBeVisible();
		await expect(page.getByRole('heading', { name: 'Your stations' })).toBeVisible();
		await expect(page.getByText('L1-COG-01')).toBeVisible();
	});

	test('a keyboard-wedge scan (badge, then Enter) moves on to the PIN', async ({ page }) => {
		const op = account('operator');
		await openSignIn(page);
		const badge = page.getByLabel('Badge number');
		await badge.click();
		// A scanner types the characters and ends with Enter.
		await page.keyboard.type(op.badge!);
		await page.keyboard.press('Enter');
		const pin = page.getByLabel('PIN', { exact: true });
		await expect(pin).toBeFocused();
		await expect(page).toHaveURL('/signin');
		await page.keyboard.type(op.pin!);
		await page.keyboard.press('Enter');
		await expect(page.getByRole('heading', { level: 1, name: `Hello, ${op.name}` })).toBeVisible();
	});

	test('a wrong PIN says so and keeps the badge number', async ({ page }) => {
		const op = account('operator');
		await signInWithBadge(page, op.badge!, '000000');
		await expect(page.getByText('That did not match. Check and try again.').first()).toBeVisible();
		await expect(page.getByLabel('Badge number')).toHaveValue(op.badge!);
		await expect(page.getByLabel('PIN', { exact: true })).toHaveValue('');
		// The right PIN still works (and forgives the failed try).
		await page.getByLabel('PIN', { exact: true }).fill(op.pin!);
		await page.getByLabel('PIN', { exact: true }).press('Enter');
		await expect(page.getByRole('heading', { level: 1, name: `Hello, ${op.name}` })).toBeVisible();
	});

	test('an operator opening an admin page gets the 403 page', async ({ page }) => {
		await signInAs(page, 'operator');
		const res = await page.goto('/admin/people');
		expect(res?.status()).toBe(403);
		await expect(page.getByRole('heading', { level: 1, name: 'Not for your role' })).toBeVisible();
		await expect(page.getByText('This page is for admin. Your roles: operator.')).toBeVisible();
		await expect(page.getByText(/ask an admin to give you the role/)).toBeVisible();
		await page.getByRole('link', { name: 'Go to home' }).click();
		await expect(page.getByRole('heading', { name: 'Your stations' })).toBeVisible();
	});
});

test('a signed-out visitor is sent to sign in and then back to the page asked for', async ({
	page
}) => {
	await openSignIn(page, '/admin/people');
	await expect(page).toHaveURL(/\/signin\?redirectTo=%2Fadmin%2Fpeople$/);
	await page.getByRole('tab', { name: 'E-mail + password' }).click();
	await page.getByLabel('E-mail', { exact: true }).fill(account('admin').email!);
	await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
	await page.getByLabel('Password', { exact: true }).press('Enter');
	await expect(page).toHaveURL('/admin/people');
	await expect(page.getByRole('heading', { level: 1, name: 'People' })).toBeVisible();
});

async function fillBadPerson(page: Page) {
	await page.goto('/admin/people/new');
	// The agency field appears as soon as the choice is made, which also shows the page is live.
	await page.getByLabel('Employment').selectOption('agency');
	await page.getByLabel('Agency', { exact: true }).fill('Mekong Staffing Co.');
	await page.getByLabel('Name as printed on certificates').fill('Lương Thị Bích Trâm');
	await page.getByLabel('Employee number').fill('AGY-TEST-7');
	// The browser accepts this address; the server's rule wants a domain with a dot.
	await page.getByLabel('E-mail (optional)').fill('tram@kbo2');
	await page.getByRole('button', { name: 'Add person' }).click();
}

async function expectFieldErrorsKeptInput(page: Page) {
	await expect(page.getByText('Not an e-mail address')).toBeVisible();
	await expect(page.getByText('Agency staff need a contract end date')).toBeVisible();
	await expect(page.getByLabel('E-mail (optional)')).toHaveAttribute('aria-invalid', 'true');
	await expect(page.getByLabel('Name as printed on certificates')).toHaveValue(
		'Lương Thị Bích Trâm'
	);
	await expect(page.getByLabel('Employee number')).toHaveValue('AGY-TEST-7');
	await expect(page.getByLabel('E-mail (optional)')).toHaveValue('tram@kbo2');
	await expect(page.getByLabel('Employment')).toHaveValue('agency');
	await expect(page.getByLabel('Agency', { exact: true })).toHaveValue('Mekong Staffing Co.');
	await expect(page).toHaveURL(/\/admin\/people\/new/);
}

test.describe('bad input on the person form', () => {
	test('shows field errors and keeps what was typed', async ({ page }) => {
		await signInAs(page, 'admin');
		await fillBadPerson(page);
		await expectFieldErrorsKeptInput(page);
	});

	test('does the same without JavaScript', async ({ browser }) => {
		const context = await browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		await page.goto('/signin');
		// Without JavaScript both sign-in forms show, one under the other.
		await page.getByLabel('E-mail', { exact: true }).fill(account('admin').email!);
		await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
		await page.getByLabel('Password', { exact: true }).press('Enter');
		await expect(page.getByRole('heading', { level: 1, name: /^Hello,/ })).toBeVisible();
		await page.goto('/admin/people/new');
		await page.getByLabel('Name as printed on certificates').fill('Lương Thị Bích Trâm');
		await page.getByLabel('Employee number').fill('AGY-TEST-7');
		await page.getByLabel('E-mail (optional)').fill('tram@kbo2');
		await page.getByLabel('Employment').selectOption('agency');
		// Without JavaScript the agency field appears only once the server answers.
		await page.getByRole('button', { name: 'Add person' }).click();
		await expect(page.getByText('Not an e-mail address')).toBeVisible();
		await expect(page.getByText('Agency staff need a contract end date')).toBeVisible();
		await expect(page.getByText('Name the agency')).toBeVisible();
		await expect(page.getByLabel('Name as printed on certificates')).toHaveValue(
			'Lương Thị Bích Trâm'
		);
		await expect(page.getByLabel('E-mail (optional)')).toHaveValue('tram@kbo2');
		await expect(page.getByLabel('Employment')).toHaveValue('agency');
		await context.close();
	});
});

test('signing out ends the session', async ({ page }) => {
	await signInAs(page, 'hr');
	await page.getByRole('button', { name: 'Sign out' }).click();
	await expect(page).toHaveURL('/signin?signedOut=1');
	await expect(page.getByText('You are signed out.')).toBeVisible();
	await page.goto('/');
	await expect(page).toHaveURL('/signin?redirectTo=%2F');
	await expect(page.getByRole('heading', { name: 'Active headcount' })).toHaveCount(0);
});
