import { expect, type Page } from '@playwright/test';
import type { TestPerson } from './instruction-fixtures';

/** Signs in through the sign-in page as a user would. */
export async function signInPage(
	page: Page,
	person: TestPerson,
	method: 'password' | 'badge' = 'password'
) {
	await page.goto('/signin');
	if (method === 'badge') {
		await page.getByRole('tab', { name: 'Badge + PIN' }).click();
		await page.getByRole('textbox', { name: 'Badge number' }).fill(person.badge!);
		await page.locator('#pin').fill(person.pin!);
		await page.locator('form[action="?/badge"]').getByRole('button', { name: 'Sign in' }).click();
	} else {
		await page.getByRole('tab', { name: 'E-mail + password' }).click();
		await page.getByRole('textbox', { name: 'E-mail' }).fill(person.email);
		await page.locator('#password').fill(person.password);
		await page
			.locator('form[action="?/password"]')
			.getByRole('button', { name: 'Sign in' })
			.click();
	}
	await expect(page).not.toHaveURL(/\/signin/);
}

/** Collects every dialog, page error and CSP report a page produces. */
export function watchForScript(page: Page) {
	const events: string[] = [];
	page.on('dialog', async (d) => {
		events.push(`dialog: ${d.message()}`);
		await d.dismiss();
	});
	page.on('pageerror', (e) => events.push(`pageerror: ${e.message}`));
	page.on('console', (m) => {
		if (/Content Security Policy|Refused to/i.test(m.text())) events.push(`csp: ${m.text()}`);
	});
	return events;
}
