import { createHash, randomBytes } from 'node:crypto';
import { and, asc, desc, eq, isNull, lt, or } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db, type Tx } from '../db';
import { API_KEY_SCOPES, apiKeys, people, stations } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import type { SessionUser } from '../auth/sessions';

export type ApiKeyScope = (typeof API_KEY_SCOPES)[number];

/** Keys look like `pbk_` + 43 base64url characters (32 random bytes). */
const KEY_PREFIX = 'pbk_';
const KEY_PATTERN = /^pbk_[A-Za-z0-9_-]{43}$/;
/** Characters kept in the clear so people can tell keys apart: `pbk_` and 8 of the secret. */
const SHOWN_PREFIX_LENGTH = 12;
// lastUsedAt to the minute is enough to see which keys are alive, and spares a write per call.
const LAST_USED_RESOLUTION_MS = 60_000;

export class ApiKeyError extends Error {
	constructor(
		public field: 'id' | 'stationId',
		message: string
	) {
		super(message);
	}
}

export interface ApiKeyInput {
	name: string;
	scope: ApiKeyScope;
	stationId?: number | null;
}

export interface IssuedApiKey {
	id: number;
	/** The whole key: shown once, never stored. */
	key: string;
	prefix: string;
	name: string;
}

/** SHA-256 of the key, hex: the only form in which a key is kept. */
export function hashApiKey(key: string): string {
	return createHash('sha256').update(key, 'utf8').digest('hex');
}

async function insertKey(
	tx: Tx,
	actor: Actor,
	input: ApiKeyInput,
	action: string,
	reason: string | null
): Promise<IssuedApiKey> {
	const stationId = input.stationId ?? null;
	if (stationId !== null) {
		const [station] = await tx
			.select({ id: stations.id, active: stations.active })
			.from(stations)
			.where(eq(stations.id, stationId));
		if (!station?.active) throw new ApiKeyError('stationId', 'Choose an active station');
	}
	const key = KEY_PREFIX + randomBytes(32).toString('base64url');
	const prefix = key.slice(0, SHOWN_PREFIX_LENGTH);
	const [{ id }] = await tx
		.insert(apiKeys)
		.values({
			name: input.name,
			prefix,
			secretHash: hashApiKey(key),
			scope: input.scope,
			stationId,
			createdBy: actor.id
		})
		.$returningId();
	await recordAudit(tx, actor, {
		action,
		entityType: 'api_key',
		entityId: id,
		newValues: { name: input.name, prefix, scope: input.scope, stationId },
		reason
	});
	return { id, key, prefix, name: input.name };
}

/** Issues a key and returns it in full this one time; only its hash and prefix are stored. */
export async function createApiKey(actor: Actor, input: ApiKeyInput): Promise<IssuedApiKey> {
	return db.transaction((tx) => insertKey(tx, actor, input, 'api_key.create', null));
}

async function lockActiveKey(tx: Tx, id: number) {
	const [row] = await tx.select().from(apiKeys).where(eq(apiKeys.id, id)).for('update');
	if (!row) throw new ApiKeyError('id', 'There is no such API key');
	if (row.revokedAt) throw new ApiKeyError('id', `Key ${row.prefix}… is already revoked`);
	return row;
}

/** Revokes a key at once (calls with it are refused from the next request on); returns its prefix. */
export async function revokeApiKey(actor: Actor, id: number, reason: string): Promise<string> {
	return db.transaction(async (tx) => {
		const row = await lockActiveKey(tx, id);
		const revokedAt = new Date();
		await tx.update(apiKeys).set({ revokedAt }).where(eq(apiKeys.id, id));
		await recordAudit(tx, actor, {
			action: 'api_key.revoke',
			entityType: 'api_key',
			entityId: id,
			oldValues: { prefix: row.prefix, revokedAt: null },
			newValues: { prefix: row.prefix, revokedAt },
			reason
		});
		return row.prefix;
	});
}

/** Replaces a key by a new one with the same name, scope and station; the old one stops working. */
export async function rotateApiKey(
	actor: Actor,
	id: number,
	reason: string | null = null
): Promise<IssuedApiKey> {
	return db.transaction(async (tx) => {
		const old = await lockActiveKey(tx, id);
		const revokedAt = new Date();
		await tx.update(apiKeys).set({ revokedAt }).where(eq(apiKeys.id, id));
		const issued = await insertKey(
			tx,
			actor,
			{ name: old.name, scope: old.scope, stationId: old.stationId },
			'api_key.create',
			`Replaces key ${old.prefix}… (rotation)`
		);
		await recordAudit(tx, actor, {
			action: 'api_key.rotate',
			entityType: 'api_key',
			entityId: id,
			oldValues: { prefix: old.prefix, revokedAt: null },
			newValues: { prefix: old.prefix, revokedAt, replacedBy: issued.id },
			reason: reason || null
		});
		return issued;
	});
}

export interface VerifiedApiKey {
	id: number;
	name: string;
	prefix: string;
	scope: ApiKeyScope;
	stationId: number | null;
}

/**
 * The key named by an `Authorization: Bearer <key>` header, if it is known, not revoked, holds
 * `scope` and (when bound to a station) that station is active; null otherwise. Records the use.
 */
export async function verifyApiKey(
	header: string | null | undefined,
	scope: ApiKeyScope
): Promise<VerifiedApiKey | null> {
	const match = header ? /^Bearer[ \t]+(\S+)[ \t]*$/i.exec(header) : null;
	if (!match || !KEY_PATTERN.test(match[1])) return null;
	const [row] = await db
		.select({
			id: apiKeys.id,
			name: apiKeys.name,
			prefix: apiKeys.prefix,
			scope: apiKeys.scope,
			stationId: apiKeys.stationId,
			stationActive: stations.active,
			lastUsedAt: apiKeys.lastUsedAt
		})
		.from(apiKeys)
		.leftJoin(stations, eq(stations.id, apiKeys.stationId))
		.where(
			and(
				eq(apiKeys.secretHash, hashApiKey(match[1])),
				isNull(apiKeys.revokedAt),
				eq(apiKeys.scope, scope)
			)
		);
	if (!row || (row.stationId !== null && !row.stationActive)) return null;
	const now = new Date();
	if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() >= LAST_USED_RESOLUTION_MS) {
		const staleBefore = new Date(now.getTime() - LAST_USED_RESOLUTION_MS);
		await db
			.update(apiKeys)
			.set({ lastUsedAt: now })
			.where(
				and(
					eq(apiKeys.id, row.id),
					or(isNull(apiKeys.lastUsedAt), lt(apiKeys.lastUsedAt, staleBefore))
				)
			);
	}
	return {
		id: row.id,
		name: row.name,
		prefix: row.prefix,
		scope: row.scope,
		stationId: row.stationId
	};
}

export type ApiCaller =
	{ kind: 'session'; user: SessionUser } | { kind: 'key'; key: VerifiedApiKey };

/**
 * Who is calling a JSON endpoint: an API key when an Authorization header is sent (a bad key is
 * refused, never replaced by the session cookie), else the signed-in person; null for nobody.
 */
export async function identifyApiCaller(
	event: { request: Request; locals: App.Locals },
	scope: ApiKeyScope
): Promise<ApiCaller | null> {
	const header = event.request.headers.get('authorization');
	if (header !== null) {
		const key = await verifyApiKey(header, scope);
		return key ? { kind: 'key', key } : null;
	}
	if (event.locals.userLoadError) throw event.locals.userLoadError;
	return event.locals.user ? { kind: 'session', user: event.locals.user } : null;
}

const creators = alias(people, 'creators');

/** Every key, newest first, as the admin list shows it (no hashes). */
export async function listApiKeys() {
	return db
		.select({
			id: apiKeys.id,
			name: apiKeys.name,
			prefix: apiKeys.prefix,
			scope: apiKeys.scope,
			station: stations.code,
			createdAt: apiKeys.createdAt,
			createdBy: creators.displayName,
			lastUsedAt: apiKeys.lastUsedAt,
			revokedAt: apiKeys.revokedAt
		})
		.from(apiKeys)
		.leftJoin(stations, eq(stations.id, apiKeys.stationId))
		.leftJoin(creators, eq(creators.id, apiKeys.createdBy))
		.orderBy(desc(apiKeys.createdAt), desc(apiKeys.id));
}

/** Active stations a key can be bound to. */
export async function listKeyStations() {
	return db
		.select({ id: stations.id, code: stations.code, name: stations.name })
		.from(stations)
		.where(eq(stations.active, true))
		.orderBy(asc(stations.code));
}
