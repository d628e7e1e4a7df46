import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { db, type Tx } from '../db';
import { lines, people, roleAssignments, shifts } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { hashSecret, verifySecret } from '../auth/password';
import { config } from '../config';
import { Refusal } from '../errors';
import { findRetiredIdentifier } from './retired';
import type { PersonInput } from '../../schemas/people';
import type { Role } from '../../roles';

export class ConflictError extends Error {
	constructor(
		public field: string,
		message: string
	) {
		super(message);
	}
}

/** All people with their roles, line and shift, for the admin list. */
export async function listPeople() {
	const rows = await db
		.select({
			id: people.id,
			employeeNo: people.employeeNo,
			displayName: people.displayName,
			email: people.email,
			badgeNo: people.badgeNo,
			employmentType: people.employmentType,
			contractEndsOn: people.contractEndsOn,
			active: people.active,
			anonymised: sql<number>`${people.anonymisedAt} is not null`,
			line: lines.code,
			shift: shifts.code,
			roles: sql<
				string | null
			>`(select group_concat(ra.role order by ra.role) from role_assignments ra where ra.person_id = people.id)`
		})
		.from(people)
		.leftJoin(lines, eq(lines.id, people.lineId))
		.leftJoin(shifts, eq(shifts.id, people.shiftId))
		.orderBy(asc(people.displayName));
	return rows.map((r) => ({
		...r,
		anonymised: Boolean(Number(r.anonymised)),
		roles: (r.roles ?? '').split(',').filter(Boolean) as Role[]
	}));
}

/** One person as the edit form needs it (no secrets). */
export async function getPerson(id: number) {
	const [p] = await db
		.select({
			id: people.id,
			employeeNo: people.employeeNo,
			displayName: people.displayName,
			email: people.email,
			badgeNo: people.badgeNo,
			locale: people.locale,
			employmentType: people.employmentType,
			agencyName: people.agencyName,
			contractEndsOn: people.contractEndsOn,
			lineId: people.lineId,
			shiftId: people.shiftId,
			active: people.active,
			employmentEndedOn: people.employmentEndedOn,
			anonymisedAt: people.anonymisedAt,
			hasPassword: sql<number>`${people.passwordHash} is not null`,
			hasPin: sql<number>`${people.pinHash} is not null`
		})
		.from(people)
		.where(eq(people.id, id));
	if (!p) return null;
	const roles = await db
		.select({ role: roleAssignments.role })
		.from(roleAssignments)
		.where(eq(roleAssignments.personId, id));
	return {
		...p,
		hasPassword: Boolean(Number(p.hasPassword)),
		hasPin: Boolean(Number(p.hasPin)),
		roles: roles.map((r) => r.role)
	};
}

const FIELD_LABEL: Record<string, string> = {
	employeeNo: 'employee number',
	email: 'e-mail address',
	badgeNo: 'badge number'
};

/** A refused write the person form can show on one of its fields. */
function fieldConflict(err: unknown): ConflictError | null {
	const msg = err instanceof Error ? err.message : '';
	const cause = (err as { cause?: { code?: string; message?: string } })?.cause;
	const text = `${msg} ${cause?.message ?? ''}`;
	if (/Duplicate entry/.test(text)) {
		// Judge by the unique key's name (people_badgeNo_unique, ...), not by the duplicated value.
		const key = /for key '([^']+)'/.exec(text)?.[1] ?? '';
		const field = /email/i.test(key) ? 'email' : /badge_?no/i.test(key) ? 'badgeNo' : 'employeeNo';
		return new ConflictError(field, `Another person already has this ${FIELD_LABEL[field]}`);
	}
	// The chosen line or shift was removed after the form was loaded (or the post was hand-made).
	if (cause?.code === 'ER_NO_REFERENCED_ROW_2') {
		if (/people_line_id/.test(text)) return new ConflictError('lineId', 'That line does not exist');
		if (/people_shift_id/.test(text))
			return new ConflictError('shiftId', 'That shift does not exist');
	}
	return null;
}

function record(input: PersonInput) {
	return {
		employeeNo: input.employeeNo,
		displayName: input.displayName,
		email: input.email,
		badgeNo: input.badgeNo,
		locale: input.locale,
		employmentType: input.employmentType,
		agencyName: input.employmentType === 'agency' ? input.agencyName : null,
		contractEndsOn: input.contractEndsOn,
		lineId: input.lineId,
		shiftId: input.shiftId
	};
}

/** Refuses identifiers that belonged to an anonymised person, on the form's field. */
async function refuseRetired(tx: Tx, input: PersonInput) {
	const retired = await findRetiredIdentifier(tx, {
		employee_no: input.employeeNo,
		badge_no: input.badgeNo,
		email: input.email
	});
	if (retired) throw new ConflictError(retired.field, retired.message);
}

const ANONYMISED_NO_EDIT =
	'This person was anonymised by the retention run; the record keeps its numbers and dates but can no longer be edited.';

/**
 * Adds a person with their roles; duplicate or retired identifiers come back as a ConflictError on
 * the field.
 */
export async function createPerson(actor: Actor, input: PersonInput, siteId: number | null) {
	try {
		return await db.transaction(async (tx) => {
			await refuseRetired(tx, input);
			const values = { ...record(input), siteId };
			const [{ id }] = await tx.insert(people).values(values).$returningId();
			await tx.insert(roleAssignments).values(input.roles.map((role) => ({ personId: id, role })));
			await recordAudit(tx, actor, {
				action: 'person.create',
				entityType: 'person',
				entityId: id,
				newValues: { ...values, roles: input.roles }
			});
			return id;
		});
	} catch (err) {
		throw fieldConflict(err) ?? err;
	}
}

/**
 * Saves changes. Roles are re-read on every request, so a removed role stops working on the
 * person's next request without signing them out.
 */
export async function updatePerson(actor: Actor, id: number, input: PersonInput) {
	try {
		await db.transaction(async (tx) => {
			const [old] = await tx.select().from(people).where(eq(people.id, id)).for('update');
			if (!old) throw new Error(`person ${id} vanished`);
			if (old.anonymisedAt) throw new ConflictError('displayName', ANONYMISED_NO_EDIT);
			await refuseRetired(tx, input);
			const oldRoles = (
				await tx
					.select({ role: roleAssignments.role })
					.from(roleAssignments)
					.where(eq(roleAssignments.personId, id))
			).map((r) => r.role);
			const next = record(input);
			const rolesChanged =
				oldRoles.length !== input.roles.length || oldRoles.some((r) => !input.roles.includes(r));
			await tx.update(people).set(next).where(eq(people.id, id));
			if (rolesChanged) {
				await tx.delete(roleAssignments).where(eq(roleAssignments.personId, id));
				await tx
					.insert(roleAssignments)
					.values(input.roles.map((role) => ({ personId: id, role })));
			}
			const before: Record<string, unknown> = {};
			const after: Record<string, unknown> = {};
			for (const k of Object.keys(next) as (keyof typeof next)[]) {
				if (old[k] !== next[k]) {
					before[k] = old[k];
					after[k] = next[k];
				}
			}
			if (rolesChanged) {
				before.roles = [...oldRoles].sort();
				after.roles = [...input.roles].sort();
			}
			await recordAudit(tx, actor, {
				action: rolesChanged ? 'person.update_roles' : 'person.update',
				entityType: 'person',
				entityId: id,
				oldValues: before,
				newValues: after
			});
		});
	} catch (err) {
		throw fieldConflict(err) ?? err;
	}
}

/** Sets a new password or PIN (hashed), ending the person's sessions. The secret is never audited. */
export async function resetSecret(
	actor: Actor,
	id: number,
	kind: 'password' | 'pin',
	secret: string,
	reason: string
) {
	const hashed = await hashSecret(secret);
	await db.transaction(async (tx) => {
		const [old] = await tx
			.select({ v: people.sessionVersion, anonymisedAt: people.anonymisedAt })
			.from(people)
			.where(eq(people.id, id))
			.for('update');
		if (!old) throw new Error(`person ${id} vanished`);
		if (old.anonymisedAt) throw new Refusal(409, ANONYMISED_NO_EDIT);
		await tx
			.update(people)
			.set(
				kind === 'password'
					? { passwordHash: hashed, sessionVersion: old.v + 1 }
					: { pinHash: hashed, sessionVersion: old.v + 1 }
			)
			.where(eq(people.id, id));
		await recordAudit(tx, actor, {
			action: kind === 'password' ? 'person.reset_password' : 'person.reset_pin',
			entityType: 'person',
			entityId: id,
			reason
		});
	});
}

/** Lines and shifts for the person form's choices. */
export async function personFormChoices() {
	const [l, s] = await Promise.all([
		db
			.select({ id: lines.id, code: lines.code, name: lines.name })
			.from(lines)
			.orderBy(asc(lines.code)),
		db
			.select({ id: shifts.id, code: shifts.code, name: shifts.name })
			.from(shifts)
			.orderBy(asc(shifts.code))
	]);
	return { lines: l, shifts: s };
}

/**
 * First-run bootstrap: with ADMIN_EMAIL and ADMIN_PASSWORD set, make sure that admin exists, is
 * active, holds the admin role and has that password.
 */
export async function ensureBootstrapAdmin() {
	const email = config.adminEmail?.trim().toLowerCase();
	const password = config.adminPassword;
	if (!email || !password) return;
	const [current] = await db.select().from(people).where(eq(people.email, email));
	if (current?.active && (await verifySecret(current.passwordHash, password))) {
		const roles = await db
			.select()
			.from(roleAssignments)
			.where(eq(roleAssignments.personId, current.id));
		if (roles.some((r) => r.role === 'admin')) return;
	}
	const passwordHash = await hashSecret(password);
	await db.transaction(async (tx) => {
		const [existing] = await tx.select().from(people).where(eq(people.email, email)).for('update');
		const system = { id: null, label: 'bootstrap (ADMIN_EMAIL)' };
		let id: number;
		if (existing) {
			id = existing.id;
			await tx
				.update(people)
				.set({ passwordHash, active: true, sessionVersion: existing.sessionVersion + 1 })
				.where(eq(people.id, id));
		} else {
			[{ id }] = await tx
				.insert(people)
				.values({
					employeeNo: `ADMIN-${Date.now().toString(36).toUpperCase()}`,
					displayName: 'Administrator',
					email,
					passwordHash
				})
				.$returningId();
		}
		const has = await tx
			.select()
			.from(roleAssignments)
			.where(and(eq(roleAssignments.personId, id), inArray(roleAssignments.role, ['admin'])));
		if (has.length === 0) await tx.insert(roleAssignments).values({ personId: id, role: 'admin' });
		await recordAudit(tx, system, {
			action: existing ? 'person.bootstrap_admin_reset' : 'person.bootstrap_admin_create',
			entityType: 'person',
			entityId: id,
			newValues: { email, roles: ['admin'] }
		});
	});
}
