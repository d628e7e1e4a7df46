import { randomBytes } from 'node:crypto';
import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import { db } from '../db';
import { authSessions, people, sites } from '../db/schema';
import { ROLES, type Role } from '../../roles';
import { config } from '../config';
import { hasContractEnded } from '../../employment';

export interface SessionUser {
	id: number;
	displayName: string;
	email: string | null;
	roles: Role[];
	siteId: number | null;
	timeZone: string;
}

/** Opens a server-side session row for a fresh sign-in and returns its id for the JWT. */
export async function openSession(
	personId: number,
	sessionVersion: number,
	method: 'password' | 'badge',
	address: string | null
): Promise<string> {
	const id = randomBytes(32).toString('base64url');
	await db.insert(authSessions).values({
		id,
		personId,
		sessionVersion,
		method,
		address,
		expiresAt: new Date(Date.now() + config.sessionHours * 3_600_000)
	});
	return id;
}

export async function revokeSession(id: string): Promise<void> {
	await db.update(authSessions).set({ revokedAt: new Date() }).where(eq(authSessions.id, id));
}

/**
 * The person behind a session, re-read on every request: null when the session was revoked or has
 * expired, the person is inactive or past their contract's end, or their session version moved
 * on (role change, reset, ...).
 */
export async function loadSessionUser(sessionId: string): Promise<SessionUser | null> {
	const rows = await db
		.select({
			id: people.id,
			displayName: people.displayName,
			email: people.email,
			siteId: people.siteId,
			contractEndsOn: people.contractEndsOn,
			timeZone: sites.timeZone,
			roles: sql<
				string | null
			>`(select group_concat(ra.role order by ra.role) from role_assignments ra where ra.person_id = people.id)`
		})
		.from(authSessions)
		.innerJoin(people, eq(people.id, authSessions.personId))
		.leftJoin(sites, eq(sites.id, people.siteId))
		.where(
			and(
				eq(authSessions.id, sessionId),
				isNull(authSessions.revokedAt),
				gt(authSessions.expiresAt, new Date()),
				eq(people.active, true),
				eq(people.sessionVersion, authSessions.sessionVersion)
			)
		)
		.limit(1);
	const r = rows[0];
	if (!r) return null;
	const timeZone = r.timeZone ?? 'UTC';
	if (hasContractEnded(r.contractEndsOn, timeZone)) return null;
	const roles = (r.roles ?? '')
		.split(',')
		.filter((x): x is Role => (ROLES as readonly string[]).includes(x));
	return {
		id: r.id,
		displayName: r.displayName,
		email: r.email,
		roles,
		siteId: r.siteId,
		timeZone
	};
}
