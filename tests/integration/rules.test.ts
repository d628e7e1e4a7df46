// Certification rules: every save is a new version (old rows never change), invalid input is
// refused field by field with nothing stored, only quality may save, and the version in force is
// chosen by its active-from instant.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import {
	makeCheck,
	makeChecklist,
	makeInstructionRows,
	makeProcess
} from '../helpers/training-fixtures';
import { signInAsDemo, signInWithPassword, type FormFields } from '../helpers/http-session';
import {
	createRuleVersion,
	insertRuleVersion,
	ruleHistory,
	ruleInForce
} from '../../src/lib/server/training/rules';
import { ruleSchema, type RuleInput } from '../../src/lib/schemas/training';
import { Refusal } from '../../src/lib/server/errors';
import { pool } from '../../src/lib/server/db';
import type { Actor } from '../../src/lib/server/audit';
import type { Role } from '../../src/lib/roles';

const DAY = 86_400_000;
const ZONE = 'Asia/Ho_Chi_Minh';
let quality: TestPerson;
let actor: Actor;

beforeAll(async () => {
	quality = await createTestPerson({ roles: ['quality'] });
	actor = { id: quality.id, label: quality.displayName, address: '127.0.0.1' };
});
afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

/** A process of its own with one effective instruction, a knowledge check and a checklist. */
async function setup() {
	const proc = await makeProcess();
	const ins = await makeInstructionRows(quality.id, proc.id, [
		{ letter: 'A', effectiveFrom: new Date(Date.now() - 30 * DAY) }
	]);
	const check = await makeCheck(proc.id, quality.id);
	const checklistId = await makeChecklist(proc.id, ins.revisionIds[0], quality.id);
	return { proc, ins, check, checklistId };
}

const input = (over: Partial<RuleInput>): RuleInput =>
	ruleSchema.parse({ practicalRequired: false, instructionIds: [], ...over });

const rulesOf = (processId: number) =>
	queryRows<Record<string, unknown>>(
		appDb(),
		'SELECT * FROM certification_rules WHERE process_id = ? ORDER BY version',
		[processId]
	);
const instructionsOf = (ruleId: number) =>
	queryRows<{ instruction_id: number }>(
		appDb(),
		'SELECT instruction_id FROM rule_instructions WHERE rule_id = ?',
		[ruleId]
	);
async function auditRows(ruleIds: number[]) {
	if (!ruleIds.length) return [];
	return queryRows<{ action: string; old_values: unknown; new_values: unknown }>(
		appDb(),
		"SELECT action, old_values, new_values FROM audit_events WHERE entity_type = 'certification_rule' AND entity_id IN (?) ORDER BY seq",
		[ruleIds.map(String)]
	);
}
const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v) as Record<string, unknown>;

describe('versions', () => {
	it('saves each change as a new version and leaves the old row and its instructions as they were', async () => {
		const { proc, ins, check, checklistId } = await setup();
		const v1 = await createRuleVersion(
			actor,
			proc.id,
			input({
				instructionIds: [ins.id],
				checkId: check.checkId,
				passMarkPct: 80,
				practicalRequired: true,
				checklistId,
				reminderDays: '30, 7'
			}),
			{ timeZone: ZONE }
		);
		expect(v1.version).toBe(1);
		const [before] = await rulesOf(proc.id);

		const v2 = await createRuleVersion(
			actor,
			proc.id,
			input({
				previousVersion: 1,
				instructionIds: [ins.id],
				checkId: check.checkId,
				passMarkPct: 90,
				practicalRequired: true,
				checklistId,
				reminderDays: '60, 30, 7',
				note: 'Raised pass mark'
			}),
			{ timeZone: ZONE }
		);
		expect(v2.version).toBe(2);
		expect(v2.id).not.toBe(v1.id);

		const rows = await rulesOf(proc.id);
		expect(rows.map((r) => r.version)).toEqual([1, 2]);
		expect(rows[0]).toEqual(before);
		expect(rows[0].pass_mark_pct).toBe(80);
		expect(rows[1].pass_mark_pct).toBe(90);
		expect(json(rows[1].reminder_days)).toEqual([60, 30, 7]);
		expect((await instructionsOf(v1.id)).map((r) => r.instruction_id)).toEqual([ins.id]);
		expect((await instructionsOf(v2.id)).map((r) => r.instruction_id)).toEqual([ins.id]);

		// One audit event per version, in the same transaction as the row; the second names what changed.
		const audits = await auditRows([v1.id, v2.id]);
		expect(audits.map((a) => a.action)).toEqual(['rule.versioned', 'rule.versioned']);
		const second = json(audits[1].new_values);
		expect(second).toMatchObject({ process: proc.code, version: 2, passMarkPct: 90 });
		expect(second.changed).toEqual(expect.arrayContaining(['passMarkPct', 'reminderDays', 'note']));
		expect(second.changed).not.toContain('checkId');
		expect(json(audits[1].old_values)).toMatchObject({ version: 1, passMarkPct: 80 });

		const history = await ruleHistory(proc.id);
		expect(history.map((h) => [h.version, h.standing])).toEqual([
			[2, 'in_force'],
			[1, 'replaced']
		]);
	});

	it('refuses a save made on an old version, and lets exactly one of two parallel saves through', async () => {
		const { proc, ins } = await setup();
		const base = input({ instructionIds: [ins.id] });
		await createRuleVersion(actor, proc.id, base, { timeZone: ZONE });
		// Opened on "no rule yet", saved after version 1 exists.
		await expect(createRuleVersion(actor, proc.id, base, { timeZone: ZONE })).rejects.toMatchObject(
			{ status: 409 }
		);

		const next = { ...base, previousVersion: 1 };
		const results = await Promise.allSettled([
			createRuleVersion(actor, proc.id, next, { timeZone: ZONE }),
			createRuleVersion(actor, proc.id, next, { timeZone: ZONE })
		]);
		const ok = results.filter((r) => r.status === 'fulfilled');
		const refused = results.filter((r) => r.status === 'rejected');
		expect(ok).toHaveLength(1);
		expect(refused).toHaveLength(1);
		const reason = (refused[0] as PromiseRejectedResult).reason;
		expect(reason).toBeInstanceOf(Refusal);
		expect(reason.status).toBe(409);
		expect(reason.message).toMatch(/Someone saved version 2/);
		const rows = await rulesOf(proc.id);
		expect(rows.map((r) => r.version)).toEqual([1, 2]);
		expect(await auditRows(rows.map((r) => r.id as number))).toHaveLength(2);
	});
});

describe('bad input', () => {
	const fields = (over: FormFields): FormFields => ({
		previousVersion: 0,
		passMarkPct: 80,
		practicalRequired: 'false',
		validityMonths: 12,
		graceDays: 14,
		reminderDays: '30, 7',
		...over
	});

	it('answers field errors, keeps the input and stores nothing', async () => {
		const { proc, ins, checklistId } = await setup();
		const client = await signInWithPassword(quality.email!, quality.password);
		const cases: [string, FormFields, RegExp][] = [
			[
				'reminders not descending',
				fields({ instructionIds: [ins.id], reminderDays: '7, 30' }),
				/from the largest to the smallest/
			],
			['pass mark 120', fields({ instructionIds: [ins.id], passMarkPct: 120 }), /at most 100/],
			[
				'practical without checklist',
				fields({ instructionIds: [ins.id], practicalRequired: 'true' }),
				/needs its checklist/
			],
			['unknown instruction', fields({ instructionIds: [987654321] }), /Unknown or withdrawn/],
			[
				'reminder longer than the validity',
				fields({ instructionIds: [ins.id], validityMonths: 1, reminderDays: '30' }),
				/less than 28 days/
			],
			[
				'checklist of another process',
				fields({
					instructionIds: [ins.id],
					practicalRequired: 'true',
					checklistId: checklistId + 1000000
				}),
				/checklist of this process/
			],
			['grace 91 days', fields({ instructionIds: [ins.id], graceDays: 91 }), /at most 90/],
			[
				'active from in the past',
				fields({
					instructionIds: [ins.id],
					activeFromDate: '2020-01-01',
					activeFromTime: '06:00'
				}),
				/Choose now/
			]
		];
		for (const [what, form, message] of cases) {
			const res = await client.postForm(`/rules/${proc.code}?/save`, form);
			const html = await res.text();
			expect(res.status, what).toBe(400);
			expect(html, what).toMatch(message);
			expect(html, what).toMatch(/Not saved/);
		}
		// The typed values come back in the form.
		const res = await client.postForm(
			`/rules/${proc.code}?/save`,
			fields({ instructionIds: [ins.id], passMarkPct: 120, reminderDays: '45, 9' })
		);
		const html = await res.text();
		expect(html).toMatch(/value="120"/);
		expect(html).toMatch(/value="45, 9"/);
		expect(await rulesOf(proc.id)).toHaveLength(0);
	});

	it('gives every role but quality 403 on the save action, and stores nothing', async () => {
		const { proc, ins } = await setup();
		const roles: Role[] = ['admin', 'trainer', 'lead', 'hr', 'operator'];
		for (const role of roles) {
			const client = await signInAsDemo(role);
			const res = await client.postForm(
				`/rules/${proc.code}?/save`,
				fields({ instructionIds: [ins.id] })
			);
			expect(res.status, role).toBe(403);
			await res.body?.cancel();
		}
		expect(await rulesOf(proc.id)).toHaveLength(0);
		// The same form from quality is saved.
		const client = await signInWithPassword(quality.email!, quality.password);
		const res = await client.postForm(
			`/rules/${proc.code}?/save`,
			fields({ instructionIds: [ins.id] })
		);
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe(`/rules/${proc.code}?saved=1`);
		expect(await rulesOf(proc.id)).toHaveLength(1);
	});
});

describe('the version in force', () => {
	it('is the newest version whose active-from has passed; a scheduled one waits', async () => {
		const { proc, ins } = await setup();
		const values = {
			instructionIds: [ins.id],
			checkId: null,
			passMarkPct: 80,
			practicalRequired: false,
			checklistId: null,
			validityMonths: 12,
			graceDays: 14,
			reminderDays: [30, 7],
			showFullNameOnVerify: false,
			note: null
		};
		const now = new Date();
		const v1 = await insertRuleVersion(actor, proc.id, 0, {
			...values,
			activeFrom: new Date(now.getTime() - 10 * DAY)
		});
		// Version 2 through the form: tomorrow 06:00 plant time.
		const tomorrow = new Date(now.getTime() + DAY).toLocaleDateString('en-CA', { timeZone: ZONE });
		const v2 = await createRuleVersion(
			actor,
			proc.id,
			input({
				previousVersion: 1,
				instructionIds: [ins.id],
				validityMonths: 24,
				activeFromDate: tomorrow,
				activeFromTime: '06:00'
			}),
			{ timeZone: ZONE }
		);
		const [row2] = (await rulesOf(proc.id)).filter((r) => r.id === v2.id);
		// 06:00 in Ho Chi Minh City (UTC+7, no DST) is 23:00 UTC the day before.
		expect((row2.active_from as Date).toISOString()).toBe(
			new Date(`${tomorrow}T06:00:00+07:00`).toISOString()
		);
		const switchAt = row2.active_from as Date;

		expect((await ruleInForce(proc.id, now))?.id).toBe(v1.id);
		expect((await ruleInForce(proc.id, new Date(switchAt.getTime() - 1)))?.id).toBe(v1.id);
		expect((await ruleInForce(proc.id, switchAt))?.id).toBe(v2.id);
		expect((await ruleInForce(proc.id, new Date(now.getTime() - 11 * DAY))) ?? null).toBeNull();
		expect((await ruleHistory(proc.id, now)).map((h) => h.standing)).toEqual([
			'scheduled',
			'in_force'
		]);

		// A third version may not come into force before the scheduled second one.
		await expect(
			insertRuleVersion(actor, proc.id, 2, {
				...values,
				activeFrom: new Date(now.getTime() + DAY / 24)
			})
		).rejects.toMatchObject({ status: 400, fields: { activeFromDate: expect.any(String) } });
		expect(await rulesOf(proc.id)).toHaveLength(2);
	});
});
