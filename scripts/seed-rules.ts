// Demo certification rules (version 1 for every demo process, saved by the quality account and in
// force since long ago) and assignments (L1 operators to COG-MB and ACF-LAM, L2 operators to
// FOG-MB, due dates spread over the coming weeks, two of them already overdue).
// Called from scripts/seed.ts after the instructions, knowledge checks and checklists exist.
import { and, eq, inArray } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import {
	instructions,
	lines,
	people,
	processes,
	roleAssignments,
	sites
} from '../src/lib/server/db/schema/index';
import { insertRuleVersion } from '../src/lib/server/training/rules';
import { assignProcess } from '../src/lib/server/training/assignments';
import { Refusal } from '../src/lib/server/errors';
import { localDate, zonedToUtc } from '../src/lib/time';
import type { Role } from '../src/lib/roles';

const DAY = 86_400_000;

interface DemoRule {
	process: string;
	instructions: string[];
	/** Uses the knowledge check and checklist of the process when the caller has them. */
	check: boolean;
	practical: boolean;
	validityMonths: number;
	graceDays: number;
	reminderDays: number[];
	showFullName?: boolean;
	note: string;
}

const RULES: DemoRule[] = [
	{
		process: 'COG-MB',
		instructions: ['WI-COG-004'],
		check: true,
		practical: true,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'Initial rule: instruction, knowledge check with a bond-force question, observed bond.'
	},
	{
		process: 'FOG-MB',
		instructions: ['WI-FOG-003'],
		check: true,
		practical: true,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'Initial rule, as for COG main bond.'
	},
	{
		process: 'ACF-LAM',
		instructions: ['WI-ACF-001', 'WI-ACF-010'],
		check: false,
		practical: false,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'Read and acknowledge: reel thaw, floor life and IPA pad cleaning.'
	},
	{
		process: 'FOG-PB',
		instructions: ['WI-FOG-002'],
		check: false,
		practical: true,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'Acknowledge; observed alignment when a checklist exists.'
	},
	{
		process: 'FOB-MB',
		instructions: ['WI-GEN-005', 'WI-CAL-006'],
		check: false,
		practical: false,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'No FOB instruction of its own yet: buffer sheet change and head temperature check.'
	},
	{
		process: 'INSP-IND',
		instructions: ['WI-INSP-007', 'WI-INSP-008'],
		check: false,
		practical: false,
		validityMonths: 12,
		graceDays: 14,
		reminderDays: [30, 7],
		note: 'Indentation inspection and peel test.'
	},
	{
		process: 'ESD-BASIC',
		instructions: ['WI-ESD-009'],
		check: false,
		practical: false,
		validityMonths: 24,
		graceDays: 30,
		reminderDays: [60, 30, 7],
		showFullName: true,
		note: 'Awareness for everyone on the floor, agency staff included.'
	}
];

/** Due date of the n-th demo assignment, in days from today: two overdue, the rest over six weeks. */
const dueInDays = (n: number) => (n === 0 ? -6 : n === 4 ? -2 : 5 + ((n * 3) % 40));

async function personByEmail(email: string) {
	const [p] = await db
		.select({ id: people.id, name: people.displayName, siteId: people.siteId })
		.from(people)
		.where(eq(people.email, email));
	if (!p) throw new Error(`demo account ${email} missing`);
	return p;
}

/**
 * Saves rule v1 for every demo process and the demo assignments. `checks` and `checklists` are
 * ids by process code (pass `{}` when there are none: the rule then asks for no check, and for no
 * practical sign-off). Returns the rule id of each process code.
 */
export async function seedRulesAndAssignments(opts: {
	checks: Record<string, number>;
	checklists: Record<string, number>;
}): Promise<Record<string, number>> {
	const started = Date.now();
	const [site] = await db
		.select({ id: sites.id, timeZone: sites.timeZone })
		.from(sites)
		.where(eq(sites.code, 'KBO-2'));
	if (!site) throw new Error('demo site KBO-2 missing');
	const zone = site.timeZone;
	const quality = await personByEmail('quality@kbo2.example');
	const procRows = await db.select({ id: processes.id, code: processes.code }).from(processes);
	const procId = (code: string) => {
		const p = procRows.find((r) => r.code === code);
		if (!p) throw new Error(`demo process ${code} missing`);
		return p.id;
	};
	const docRows = await db
		.select({ id: instructions.id, docNumber: instructions.docNumber })
		.from(instructions);

	// In force from 06:00 plant time, 400 days ago: before every demo certificate.
	const activeFrom = zonedToUtc(localDate(new Date(Date.now() - 400 * DAY), zone), '06:00', zone);
	const ruleIds: Record<string, number> = {};
	for (const r of RULES) {
		const checkId = r.check ? (opts.checks[r.process] ?? null) : null;
		const checklistId = r.practical ? (opts.checklists[r.process] ?? null) : null;
		const { id } = await insertRuleVersion(
			{ id: quality.id, label: quality.name, address: null },
			procId(r.process),
			0,
			{
				instructionIds: r.instructions.map((d) => {
					const row = docRows.find((x) => x.docNumber === d);
					if (!row) throw new Error(`demo instruction ${d} missing`);
					return row.id;
				}),
				checkId,
				passMarkPct: 80,
				practicalRequired: checklistId !== null,
				checklistId,
				validityMonths: r.validityMonths,
				graceDays: r.graceDays,
				reminderDays: r.reminderDays,
				showFullNameOnVerify: r.showFullName ?? false,
				note: r.note,
				activeFrom
			}
		);
		ruleIds[r.process] = id;
	}

	const assigned = await seedAssignments(zone, procId);
	console.log(
		`demo rules (${RULES.length}) and assignments (${assigned}) loaded in ${Date.now() - started} ms`
	);
	return ruleIds;
}

async function operatorsOf(lineCode: string) {
	return db
		.select({ id: people.id })
		.from(people)
		.innerJoin(lines, eq(lines.id, people.lineId))
		.innerJoin(roleAssignments, eq(roleAssignments.personId, people.id))
		.where(
			and(
				eq(lines.code, lineCode),
				eq(people.active, true),
				inArray(roleAssignments.role, ['operator'])
			)
		)
		.orderBy(people.id);
}

/** Each line's lead assigns their own operators, one by one so the due dates can differ. */
async function seedAssignments(zone: string, procId: (code: string) => number) {
	const plan: [string, string, string[]][] = [
		['L1', 'lead.l1@kbo2.example', ['COG-MB', 'ACF-LAM']],
		['L2', 'lead.l2@kbo2.example', ['FOG-MB']]
	];
	let count = 0;
	let turn = 0;
	for (const [line, leadEmail, codes] of plan) {
		const lead = await personByEmail(leadEmail);
		const viewer = {
			id: lead.id,
			roles: ['lead'] as Role[],
			siteId: lead.siteId,
			timeZone: zone
		};
		const actor = { id: lead.id, label: lead.name, address: null };
		for (const code of codes) {
			for (const op of await operatorsOf(line)) {
				const days = dueInDays(turn++);
				const due = localDate(new Date(Date.now() + days * DAY), zone);
				// Assigned three weeks before it fell due (or a week ago, whichever is earlier).
				const at = new Date(Date.now() - Math.max(7, 21 - days) * DAY);
				try {
					const r = await assignProcess(
						actor,
						viewer,
						{
							processId: procId(code),
							scope: 'person',
							personId: op.id,
							lineId: null,
							stationId: null,
							dueOn: due
						},
						at
					);
					count += r.assigned;
				} catch (err) {
					// An agency worker whose contract has ended is not assigned.
					if (!(err instanceof Refusal)) throw err;
				}
			}
		}
	}
	return count;
}
