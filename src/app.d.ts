import type { Role } from '$lib/roles';

declare global {
	namespace App {
		interface Error {
			message: string;
			id?: string;
			/** Set on API errors, so JSON clients get { error } like every other API failure. */
			error?: string;
		}
		interface Locals {
			/** The open session's id (from the JWT), used to revoke it at sign-out. */
			sessionId: string | null;
			/** The signed-in person, re-read from the database on every request; null when signed out. */
			user: {
				id: number;
				displayName: string;
				email: string | null;
				roles: Role[];
				siteId: number | null;
				timeZone: string;
			} | null;
			/** Set when re-reading the signed-in person failed; the guards throw it (see hooks.server.ts). */
			userLoadError: unknown;
		}
		// interface PageData {}
		// interface PageState {}
		// interface Platform {}
	}
}

export {};
