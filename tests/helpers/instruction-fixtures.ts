// Test fixtures for the Instructions area: people of their own (so the demo data stays as it is),
// HTTP sessions against the built server, and instructions walked through the real workflow.
import { randomBytes } from 'node:crypto';
import mysql from 'mysql2/promise';
import { db } from '../../src/lib/server/db/index';
import { people, roleAssignments, sites } from '../../src/lib/server/db/schema/index';
import { hashSecret } from '../../src/lib/server/auth/password';
import {
	createInstruction,
	createNextRevision,
	saveDraft,
	signRevision,
	submitRevision
} from '../../src/lib/server/instructions/workflow';
import { findInstruction, getRevision } from '../../src/lib/server/instructions/queries';
import type { Role } from '../../src/lib/roles';

export const APP_URL = process.env.TEST_APP_URL ?? 'http://127.0.0.1:3100';
export const PLANT_ZONE = 'Asia/Ho_Chi_Minh';

export const uniq = () => randomBytes(4).toString('hex');

export interface TestPerson {
	id: number;
	email: string;
	password: string;
	displayName: string;
	badge?: string;
	pin?: string;
	roles: Role[];
	/** An audit/workflow actor for calling server functions directly. */
	actor: { id: number; label: string; address: string };
}

/** Adds a person with the given roles at the demo site, with a password (and a PIN for operators). */
export async function createTestPerson(roles: Role[], name?: string): Promise<TestPerson> {
	const tag = uniq();
	const password = `pw-${randomBytes(12).toString('base64url')}`;
	const [site] = await db.select({ id: sites.id }).from(sites).limit(1);
	const displayName = name ?? `Test ${roles.join('+')} ${tag}`;
	const email = `${roles.join('-')}-${tag}@test.example`;
	const badge = roles.includes('operator') ? `TB-${tag}` : undefined;
	const pin = badge ? String(100000 + Math.floor(Math.random() * 899999)) : undefined;
	const [{ id }] = await db
		.insert(people)
		.values({
			employeeNo: `T${tag}`,
			displayName,
			email,
			badgeNo: badge ?? null,
			siteId: site?.id ?? null,
			passwordHash: await hashSecret(password),
			pinHash: pin ? await hashSecret(pin) : null
		})
		.$returningId();
	await db.insert(roleAssignments).values(roles.map((role) => ({ personId: id, role })));
	return {
		id,
		email,
		password,
		displayName,
		badge,
		pin,
		roles,
		actor: { id, label: displayName, address: '127.0.0.1' }
	};
}

/** A connection as the owner user, for the edits an insider with DDL rights could make. */
export function ownerConnection() {
	const uri = process.env.DATABASE_OWNER_URL;
	if (!uri) throw new Error('DATABASE_OWNER_URL is not set (run through npm test)');
	return mysql.createConnection({ uri, timezone: 'Z' });
}

export interface Session {
	cookie: string;
	fetch: (path: string, init?: RequestInit) => Promise<Response>;
}

function sessionFrom(cookie: string): Session {
	return {
		cookie,
		fetch: (path, init = {}) => {
			const headers = new Headers(init.headers);
			headers.set('cookie', cookie);
			if (!headers.has('origin')) headers.set('origin', APP_URL);
			return fetch(APP_URL + path, { ...init, headers, redirect: 'manual' });
		}
	};
}

/** Signs in through the real sign-in form (e-mail + password, or badge + PIN) and keeps the cookie. */
export async function signIn(
	person: TestPerson,
	method: 'password' | 'badge' = 'password'
): Promise<Session> {
	const body =
		method === 'password'
			? new URLSearchParams({ email: person.email, password: person.password, redirectTo: '/' })
			: new URLSearchParams({ badge: person.badge!, pin: person.pin!, redirectTo: '/' });
	const res = await fetch(`${APP_URL}/signin?/${method}`, {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin: APP_URL },
		body,
		redirect: 'manual'
	});
	const cookies = res.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.filter((c) => c.includes('session-token'));
	if (!cookies.length) throw new Error(`sign-in failed for ${person.email} (${res.status})`);
	return sessionFrom(cookies.join('; '));
}

export interface FixtureRevision {
	source: string;
	/** Effective instant; omit to leave the revision in review ('review') or draft ('draft'). */
	effectiveFrom?: Date;
	stop?: 'draft' | 'review';
}

/**
 * Registers an instruction and walks each revision through draft → review → approval as
 * `author` and `approver`, with the effective instants given. Returns ids and letters.
 */
export async function makeInstruction(
	author: TestPerson,
	approver: TestPerson,
	revs: FixtureRevision[],
	opts: { title?: string; docNumber?: string } = {}
) {
	const docNumber = opts.docNumber ?? `WI-T${uniq().toUpperCase().slice(0, 6)}-001`;
	const created = await createInstruction(author.actor, {
		docNumber,
		title: opts.title ?? `Test instruction ${docNumber}`,
		processId: null,
		stationIds: [],
		reviewDueOn: null,
		source: ''
	});
	const letters: string[] = [];
	const ids: number[] = [];
	for (let k = 0; k < revs.length; k++) {
		const r = revs[k];
		let revisionId = created.revisionId;
		let letter = 'A';
		if (k > 0) {
			const next = await createNextRevision(author.actor, created.id);
			revisionId = next.id;
			letter = next.letter;
		}
		const current = (await getRevision(created.id, letter))!;
		const saved = await saveDraft(author.actor, revisionId, {
			source: r.source,
			version: current.version
		});
		letters.push(letter);
		ids.push(revisionId);
		if (r.stop === 'draft') break;
		await submitRevision(author.actor, revisionId, {
			version: saved.version,
			changeSummary: `Revision ${letter} for a test`,
			reason: 'Test fixture',
			classification: 'acknowledge'
		});
		if (r.stop === 'review') break;
		await approveAt(approver, revisionId, r.effectiveFrom ?? new Date());
	}
	const instruction = (await findInstruction(docNumber))!;
	return { docNumber, instructionId: instruction.id, letters, revisionIds: ids };
}

/** Approves a revision in review with an effective instant, with the approver's password. */
export async function approveAt(approver: TestPerson, revisionId: number, effectiveFrom: Date) {
	const now = new Date(Math.min(Date.now(), effectiveFrom.getTime()));
	// The instant is passed as UTC wall-clock so no zone arithmetic hides in the fixture.
	const iso = effectiveFrom.toISOString();
	return signRevision(
		approver.actor,
		revisionId,
		{
			password: approver.password,
			meaning: 'approved',
			effectiveDate: iso.slice(0, 10),
			effectiveTime: iso.slice(11, 19),
			timeZone: 'UTC'
		},
		now
	);
}
