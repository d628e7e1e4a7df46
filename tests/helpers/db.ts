// Direct MariaDB access for integration tests: the owner user (DDL, and rights the app lacks) and
// the app user (the same rights as the running server), plus throwaway people to sign in as.
import { randomBytes } from 'node:crypto';
import mysql, { type Pool, type ResultSetHeader, type RowDataPacket } from 'mysql2/promise';
import { hashSecret } from '../../src/lib/server/auth/password';
import type { Role } from '../../src/lib/roles';

function required(name: string): string {
	const v = process.env[name];
	if (!v) throw new Error(`${name} is not set; run the tests through \`npm test\``);
	return v;
}

export const ownerUrl = () => required('DATABASE_OWNER_URL');
export const appUrl = () => required('DATABASE_URL');
/** The test database's name (`padbridge_test` under `npm test`). */
export const testDbName = () => new URL(ownerUrl()).pathname.slice(1);

/** The same server and credentials as `url`, another database. */
export function urlForDatabase(url: string, database: string): string {
	const u = new URL(url);
	u.pathname = `/${database}`;
	return u.toString();
}

const pools: Pool[] = [];
let owner: Pool | null = null;
let app: Pool | null = null;

function makePool(uri: string): Pool {
	const p = mysql.createPool({
		uri,
		timezone: 'Z',
		connectionLimit: 4,
		charset: 'utf8mb4_unicode_ci'
	});
	pools.push(p);
	return p;
}

/** A pool connected as the owner user (what migrations run as). */
export function ownerDb(): Pool {
	owner ??= makePool(ownerUrl());
	return owner;
}

/** A pool connected as the app user, with exactly the grants the server has. */
export function appDb(): Pool {
	app ??= makePool(appUrl());
	return app;
}

/** Closes every pool this module opened; call it in afterAll. */
export async function closeDbHelpers(): Promise<void> {
	await Promise.all(pools.splice(0).map((p) => p.end()));
	owner = app = null;
}

export async function queryRows<T = RowDataPacket>(
	pool: Pool,
	sql: string,
	params: unknown[] = []
): Promise<T[]> {
	const [rows] = await pool.query<RowDataPacket[]>(sql, params);
	return rows as T[];
}

export interface TestPerson {
	id: number;
	employeeNo: string;
	displayName: string;
	email: string | null;
	badge: string | null;
	password: string;
	pin: string;
	roles: Role[];
}

export interface TestPersonOptions {
	roles: Role[];
	displayName?: string;
	/** Default true; false makes a badge-only person (no e-mail, like most operators). */
	withEmail?: boolean;
	password?: string;
	pin?: string;
	line?: 'L1' | 'L2';
	employmentType?: 'employee' | 'agency' | 'contractor';
	contractEndsOn?: string | null;
	active?: boolean;
}

/** A password long enough for the password rule (15+ characters). */
export const TEST_PASSWORD = 'amber-film-on-glass-42';
export const TEST_PIN = '735194';

const created: number[] = [];

/**
 * Adds a person to the demo site with the given roles and a known password and PIN, hashed with the
 * app's own argon2id settings. Identifiers are random, so tests never collide with each other or
 * with the demo data.
 */
export async function createTestPerson(opts: TestPersonOptions): Promise<TestPerson> {
	const tag = randomBytes(5).toString('hex').toUpperCase();
	const password = opts.password ?? TEST_PASSWORD;
	const pin = opts.pin ?? TEST_PIN;
	const email = opts.withEmail === false ? null : `t-${tag.toLowerCase()}@test.kbo2.example`;
	const badge = `T-${tag}`;
	const displayName = opts.displayName ?? `Test person ${tag} (${opts.roles.join('+')})`;
	const pool = appDb();
	const [site] = await queryRows<{ id: number }>(pool, "SELECT id FROM sites WHERE code = 'KBO-2'");
	const [line] = opts.line
		? await queryRows<{ id: number }>(pool, 'SELECT id FROM `lines` WHERE code = ?', [opts.line])
		: [];
	const now = new Date();
	const [res] = await pool.query<ResultSetHeader>(
		`INSERT INTO people (employee_no, display_name, email, badge_no, locale, employment_type,
		   agency_name, contract_ends_on, site_id, line_id, active, password_hash, pin_hash,
		   created_at, updated_at)
		 VALUES (?, ?, ?, ?, 'en', ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		[
			`T-${tag}`,
			displayName,
			email,
			badge,
			opts.employmentType ?? 'employee',
			opts.employmentType === 'agency' ? 'Test Staffing' : null,
			opts.contractEndsOn ?? null,
			site?.id ?? null,
			line?.id ?? null,
			opts.active === false ? 0 : 1,
			await hashSecret(password),
			await hashSecret(pin),
			now,
			now
		]
	);
	const id = res.insertId;
	if (opts.roles.length) {
		await pool.query('INSERT INTO role_assignments (person_id, role, granted_at) VALUES ?', [
			opts.roles.map((r) => [id, r, now])
		]);
	}
	created.push(id);
	return {
		id,
		employeeNo: `T-${tag}`,
		displayName,
		email,
		badge,
		password,
		pin,
		roles: opts.roles
	};
}

/**
 * Deactivates the people this file created, so lists and counts other tests read stay close to
 * the demo data. Their rows stay: the audit trail refers to them.
 */
export async function retireTestPeople(): Promise<void> {
	if (!created.length) return;
	await appDb().query(
		'UPDATE people SET active = 0, session_version = session_version + 1 WHERE id IN (?)',
		[created.splice(0)]
	);
}

/** The demo person with this e-mail address or badge number. */
export async function demoPersonId(emailOrBadge: string): Promise<number> {
	const [row] = await queryRows<{ id: number }>(
		appDb(),
		'SELECT id FROM people WHERE email = ? OR badge_no = ?',
		[emailOrBadge, emailOrBadge]
	);
	if (!row) throw new Error(`no demo person ${emailOrBadge}`);
	return row.id;
}
