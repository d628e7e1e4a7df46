// Set-up most integration files share: a signed-in demo account for the whole file, and tidying
// the throwaway people and database pools afterwards.
import { afterAll, beforeAll } from 'vitest';
import type { Role } from '../../src/lib/roles';
import { closeDbHelpers, retireTestPeople } from './db';
import { signInAsDemo, type HttpClient } from './http-session';

/** Retires this file's throwaway people and closes the helper pools after its tests. */
export function tidyAfterFile(): void {
	afterAll(async () => {
		await retireTestPeople();
		await closeDbHelpers();
	});
}

/**
 * Signs in the demo account of `role` before the file's tests (and tidies up after them). Read
 * `.client` inside tests, once the sign-in has happened.
 */
export function useDemoSession(role: Role): { readonly client: HttpClient } {
	let client: HttpClient | null = null;
	beforeAll(async () => {
		client = await signInAsDemo(role);
	});
	tidyAfterFile();
	return {
		get client() {
			if (!client) throw new Error('the demo session is opened in beforeAll');
			return client;
		}
	};
}
