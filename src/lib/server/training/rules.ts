// Certification rules: versioned per process; the version in force is the newest whose activeFrom
// has passed.
import { and, desc, eq, inArray, lte } from 'drizzle-orm';
import { db, type DbOrTx } from '../db';
import { certificationRules, ruleInstructions } from '../db/schema';

export type RuleRow = typeof certificationRules.$inferSelect;
export interface RuleInForce extends RuleRow {
	instructionIds: number[];
}

/** The rule version in force for a process at `now`, with the instructions it asks to acknowledge. */
export async function ruleInForce(
	processId: number,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<RuleInForce | null> {
	const [rule] = await conn
		.select()
		.from(certificationRules)
		.where(
			and(eq(certificationRules.processId, processId), lte(certificationRules.activeFrom, now))
		)
		.orderBy(desc(certificationRules.version))
		.limit(1);
	if (!rule) return null;
	const ins = await conn
		.select({ instructionId: ruleInstructions.instructionId })
		.from(ruleInstructions)
		.where(eq(ruleInstructions.ruleId, rule.id));
	return { ...rule, instructionIds: ins.map((r) => r.instructionId) };
}

/** Rule rows by id with their instruction lists (certificates record the version they were issued under). */
export async function rulesById(
	ids: number[],
	conn: DbOrTx = db
): Promise<Map<number, RuleInForce>> {
	const out = new Map<number, RuleInForce>();
	if (!ids.length) return out;
	const rows = await conn
		.select()
		.from(certificationRules)
		.where(inArray(certificationRules.id, ids));
	const ins = await conn
		.select()
		.from(ruleInstructions)
		.where(inArray(ruleInstructions.ruleId, ids));
	for (const r of rows) out.set(r.id, { ...r, instructionIds: [] });
	for (const i of ins) out.get(i.ruleId)?.instructionIds.push(i.instructionId);
	return out;
}

/** The widest reminder offset: from that many days before expiry a certificate reads "expiring". */
export function expiringWindowDays(rule: Pick<RuleRow, 'reminderDays'>): number {
	return rule.reminderDays.length ? Math.max(...rule.reminderDays) : 30;
}
