// Retention periods per record type, set by admin. Until a rule is saved the defaults in
// src/lib/records/retention.ts apply (and the page says so).
import { eq, inArray } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db, type DbOrTx } from '../db';
import { people, retentionRules } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { DEFAULT_RETENTION_YEARS } from '../../records/retention';
import { RETENTION_RECORD_TYPES, type RetentionRecordType } from '../../records/vocabulary';

export interface RuleInForce {
	years: number;
	source: 'rule' | 'default';
	updatedAt: Date | null;
	updatedBy: string | null;
}

export type RulesInForce = Record<RetentionRecordType, RuleInForce>;

const setter = alias(people, 'rule_setter');

/** The period in force for each record type: the saved rule, or the default. */
export async function getRetentionRules(conn: DbOrTx = db): Promise<RulesInForce> {
	const rows = await conn
		.select({
			recordType: retentionRules.recordType,
			years: retentionRules.years,
			updatedAt: retentionRules.updatedAt,
			updatedBy: setter.displayName
		})
		.from(retentionRules)
		.leftJoin(setter, eq(setter.id, retentionRules.updatedBy));
	return Object.fromEntries(
		RETENTION_RECORD_TYPES.map((type) => {
			const row = rows.find((r) => r.recordType === type);
			const rule: RuleInForce = row
				? { years: row.years, source: 'rule', updatedAt: row.updatedAt, updatedBy: row.updatedBy }
				: {
						years: DEFAULT_RETENTION_YEARS[type],
						source: 'default',
						updatedAt: null,
						updatedBy: null
					};
			return [type, rule];
		})
	) as RulesInForce;
}

export interface RetentionRulesInput {
	trainingRecordsYears: number;
	gateLogYears: number;
	reason: string;
}

/**
 * Saves both periods; each one that changes (or is saved for the first time, replacing the
 * default) gets its own audit event with the old and new values. Returns the types that changed.
 */
export async function setRetentionRules(
	actor: Actor & { id: number },
	input: RetentionRulesInput,
	now: Date = new Date()
): Promise<RetentionRecordType[]> {
	const wanted: Record<RetentionRecordType, number> = {
		training_records: input.trainingRecordsYears,
		gate_log: input.gateLogYears
	};
	return db.transaction(async (tx) => {
		const current = await tx
			.select()
			.from(retentionRules)
			.where(inArray(retentionRules.recordType, [...RETENTION_RECORD_TYPES]))
			.for('update');
		const changed: RetentionRecordType[] = [];
		for (const type of RETENTION_RECORD_TYPES) {
			const row = current.find((r) => r.recordType === type);
			if (row && row.years === wanted[type]) continue;
			await tx
				.insert(retentionRules)
				.values({ recordType: type, years: wanted[type], updatedBy: actor.id, updatedAt: now })
				.onDuplicateKeyUpdate({
					set: { years: wanted[type], updatedBy: actor.id, updatedAt: now }
				});
			await recordAudit(tx, actor, {
				action: 'retention.rule_set',
				entityType: 'retention_rule',
				entityId: type,
				oldValues: row
					? { years: row.years, source: 'rule' }
					: { years: DEFAULT_RETENTION_YEARS[type], source: 'default' },
				newValues: { years: wanted[type], source: 'rule' },
				reason: input.reason
			});
			changed.push(type);
		}
		return changed;
	});
}
