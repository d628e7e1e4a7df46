// Loads the demo plant of the product brief: Kestrel Bay Optronics, plant KBO-2 (invented).
// Run by `npm start` / `npm test` when the database is empty, as the owner user.
import { db, pool } from '../src/lib/server/db/index';
import { eq } from 'drizzle-orm';
import {
	checklists,
	lines,
	people,
	processes,
	roleAssignments,
	shifts,
	sites,
	stationProcesses,
	stations
} from '../src/lib/server/db/schema/index';
import { recordAudit } from '../src/lib/server/audit/index';
import { hashSecret } from '../src/lib/server/auth/password';
import type { Role } from '../src/lib/roles';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo-accounts.js';
import { seedInstructions } from './seed-instructions';
import { seedChecks } from './seed-checks';
import { seedChecklists } from './seed-signoffs';
import { seedRulesAndAssignments } from './seed-rules';
import { seedCertificates } from './seed-certificates';
import { seedRecords } from './seed-records';
import { seedMail } from './seed-mail';

const DEMO_PIN = DEMO_ACCOUNTS.find((a) => a.role === 'operator')!.pin!;

const PROCESSES = [
	{ code: 'ACF-LAM', name: 'ACF lamination (pre-attach)', bondType: 'ACF' },
	{ code: 'COG-MB', name: 'COG main bond', bondType: 'COG' },
	{ code: 'FOG-PB', name: 'FOG pre-bond', bondType: 'FOG' },
	{ code: 'FOG-MB', name: 'FOG main bond', bondType: 'FOG' },
	{ code: 'FOB-MB', name: 'FOB main bond', bondType: 'FOB' },
	{ code: 'INSP-IND', name: 'Indentation inspection', bondType: 'INSP' },
	{ code: 'ESD-BASIC', name: 'ESD basics', bondType: 'GEN' }
] as const;

const STATIONS: {
	code: string;
	line: 'L1' | 'L2';
	name: string;
	processes: string[];
	min: number;
}[] = [
	{
		code: 'L1-COG-01',
		line: 'L1',
		name: 'COG bonder 1 (1.4" OLED)',
		processes: ['ACF-LAM', 'COG-MB'],
		min: 2
	},
	{
		code: 'L1-COG-02',
		line: 'L1',
		name: 'COG bonder 2 (1.4" OLED)',
		processes: ['ACF-LAM', 'COG-MB'],
		min: 2
	},
	{
		code: 'L1-FOG-01',
		line: 'L1',
		name: 'FOG pre-bonder',
		processes: ['ACF-LAM', 'FOG-PB'],
		min: 2
	},
	{ code: 'L1-FOG-02', line: 'L1', name: 'FOG main bonder', processes: ['FOG-MB'], min: 2 },
	{
		code: 'L1-INSP-01',
		line: 'L1',
		name: 'Indentation microscope',
		processes: ['INSP-IND'],
		min: 1
	},
	{
		code: 'L2-FOG-01',
		line: 'L2',
		name: 'FOG pre-bonder (7" LCD)',
		processes: ['ACF-LAM', 'FOG-PB'],
		min: 2
	},
	{
		code: 'L2-FOG-02',
		line: 'L2',
		name: 'FOG main bonder A (7" LCD)',
		processes: ['FOG-MB'],
		min: 2
	},
	{
		code: 'L2-FOG-03',
		line: 'L2',
		name: 'FOG main bonder B (7" LCD)',
		processes: ['FOG-PB', 'FOG-MB'],
		min: 2
	},
	{
		code: 'L2-FOB-01',
		line: 'L2',
		name: 'FOB bonder (PCB to FPC)',
		processes: ['ACF-LAM', 'FOB-MB'],
		min: 2
	},
	{
		code: 'L2-INSP-01',
		line: 'L2',
		name: 'Indentation microscope',
		processes: ['INSP-IND'],
		min: 1
	}
];

type Seed = {
	name: string;
	roles: Role[];
	line?: 'L1' | 'L2';
	shift?: 'A' | 'B' | 'C';
	email?: string;
	badge?: string;
	locale?: string;
	agency?: string;
	contractEndsOn?: string;
};

const OFFICE: Seed[] = [
	...DEMO_ACCOUNTS.filter((a) => a.email).map((a) => ({
		name: a.name,
		email: a.email,
		roles: [a.role as Role],
		// The demo trainer coaches on L1, so their home shows that line's stations.
		line: a.role === 'lead' || a.role === 'trainer' ? ('L1' as const) : undefined,
		shift: a.role === 'lead' ? ('A' as const) : undefined
	})),
	{
		name: 'Arjun Mehta',
		email: 'lead.l2@kbo2.example',
		roles: ['lead'],
		line: 'L2',
		shift: 'A',
		locale: 'hi'
	},
	{
		name: 'Phạm Quốc Bảo',
		email: 'lead.night@kbo2.example',
		roles: ['lead'],
		line: 'L2',
		shift: 'C',
		locale: 'vi'
	},
	{ name: 'Ingrid Solberg', email: 'trainer2@kbo2.example', roles: ['trainer'], line: 'L2' },
	{ name: '김민준', email: 'process.eng@kbo2.example', roles: ['trainer', 'quality'], locale: 'ko' }
];

// Operators: names from several languages, on purpose (certificates must print them all).
const OPERATOR_NAMES: [string, 'L1' | 'L2', 'A' | 'B' | 'C', string][] = [
	['Trần Thị Thu Hà', 'L1', 'A', 'vi'],
	['Nguyễn Văn Long', 'L1', 'A', 'vi'],
	['Đỗ Thị Ngọc Ánh', 'L1', 'A', 'vi'],
	['王伟', 'L1', 'A', 'zh'],
	['Võ Minh Tuấn', 'L1', 'B', 'vi'],
	['Lý Thị Hồng Nhung', 'L1', 'B', 'vi'],
	['佐藤 美咲', 'L1', 'B', 'ja'],
	['Bùi Đức Thắng', 'L1', 'B', 'vi'],
	['Hoàng Thị Yến', 'L1', 'C', 'vi'],
	['Kavya Reddy', 'L1', 'C', 'hi'],
	['Ngô Thanh Tâm', 'L1', 'C', 'vi'],
	['李娜', 'L1', 'C', 'zh'],
	['Phan Văn Khải', 'L2', 'A', 'vi'],
	['Đặng Thị Mai', 'L2', 'A', 'vi'],
	['박서연', 'L2', 'A', 'ko'],
	['Huỳnh Công Danh', 'L2', 'A', 'vi'],
	['Trương Thị Kim Oanh', 'L2', 'B', 'vi'],
	['Marisol Dela Cruz', 'L2', 'B', 'en'],
	['Vũ Hải Đăng', 'L2', 'B', 'vi'],
	['张磊', 'L2', 'B', 'zh'],
	['Lâm Thị Bích Ngọc', 'L2', 'C', 'vi'],
	['Dương Quang Huy', 'L2', 'C', 'vi'],
	['Ewa Kowalczyk', 'L2', 'C', 'pl'],
	['Mai Xuân Phúc', 'L2', 'C', 'vi']
];
const AGENCY: [string, 'L1' | 'L2', 'A' | 'B' | 'C', string][] = [
	['Tô Thị Thảo', 'L1', 'B', '2027-03-31'],
	['Quách Văn Sơn', 'L2', 'A', '2027-01-15'],
	['Chu Minh Nguyệt', 'L2', 'C', '2026-12-20'],
	['Lưu Đình Trọng', 'L1', 'C', '2027-06-30']
];

async function main() {
	const started = Date.now();
	await db.transaction(async (tx) => {
		const [{ id: siteId }] = await tx
			.insert(sites)
			.values({
				code: 'KBO-2',
				name: 'Kestrel Bay Optronics · Plant KBO-2',
				timeZone: 'Asia/Ho_Chi_Minh'
			})
			.$returningId();
		const lineIds: Record<string, number> = {};
		for (const [code, name] of [
			['L1', 'Line 1 · COG + FOG, 1.4" watch OLED'],
			['L2', 'Line 2 · FOG + FOB, 7" automotive LCD']
		]) {
			const [{ id }] = await tx.insert(lines).values({ siteId, code, name }).$returningId();
			lineIds[code] = id;
		}
		const shiftIds: Record<string, number> = {};
		for (const [code, name, startsAt, endsAt] of [
			['A', 'Early shift', '06:00', '14:00'],
			['B', 'Late shift', '14:00', '22:00'],
			['C', 'Night shift', '22:00', '06:00']
		]) {
			const [{ id }] = await tx
				.insert(shifts)
				.values({ siteId, code, name, startsAt, endsAt })
				.$returningId();
			shiftIds[code] = id;
		}
		const processIds: Record<string, number> = {};
		for (const p of PROCESSES) {
			const [{ id }] = await tx.insert(processes).values(p).$returningId();
			processIds[p.code] = id;
		}
		for (const s of STATIONS) {
			const [{ id }] = await tx
				.insert(stations)
				.values({ lineId: lineIds[s.line], code: s.code, name: s.name, minQualified: s.min })
				.$returningId();
			await tx
				.insert(stationProcesses)
				.values(
					[...s.processes, 'ESD-BASIC'].map((c) => ({ stationId: id, processId: processIds[c] }))
				);
		}

		const passwordHash = await hashSecret(DEMO_PASSWORD);
		const seeds: Seed[] = [
			...OFFICE,
			...OPERATOR_NAMES.map(([name, line, shift, locale], i) => ({
				name,
				line,
				shift,
				locale,
				roles: ['operator'] as Role[],
				badge: i === 0 ? DEMO_ACCOUNTS.find((a) => a.role === 'operator')!.badge : `KB-${10422 + i}`
			})),
			...AGENCY.map(([name, line, shift, contractEndsOn], i) => ({
				name,
				line,
				shift,
				locale: 'vi',
				roles: ['operator'] as Role[],
				badge: `AG-${2201 + i}`,
				agency: 'Mekong Staffing Co.',
				contractEndsOn
			}))
		];
		let n = 0;
		for (const s of seeds) {
			n++;
			const [{ id }] = await tx
				.insert(people)
				.values({
					employeeNo: s.agency ? `AGY-${String(n).padStart(4, '0')}` : `E${String(20000 + n)}`,
					displayName: s.name,
					email: s.email ?? null,
					badgeNo: s.badge ?? (s.email ? `KB-${30000 + n}` : null),
					locale: s.locale ?? 'en',
					employmentType: s.agency ? 'agency' : 'employee',
					agencyName: s.agency ?? null,
					contractEndsOn: s.contractEndsOn ?? null,
					siteId,
					lineId: s.line ? lineIds[s.line] : null,
					shiftId: s.shift ? shiftIds[s.shift] : null,
					passwordHash: s.email ? passwordHash : null,
					pinHash: s.badge ? await hashSecret(DEMO_PIN) : null
				})
				.$returningId();
			await tx.insert(roleAssignments).values(s.roles.map((role) => ({ personId: id, role })));
		}
		await recordAudit(tx, null, {
			action: 'demo.load',
			entityType: 'site',
			entityId: siteId,
			newValues: { people: seeds.length, stations: STATIONS.length, processes: PROCESSES.length },
			reason: 'demo plant loaded on an empty database'
		});
	});
	console.log(`demo plant loaded in ${Date.now() - started} ms`);
	await seedInstructions();
	await seedTraining();
	await seedRecords();
	await seedMail();
}

/** Knowledge checks, checklists, certification rules and assignments, then the certificate history. */
async function seedTraining() {
	const checks = await seedChecks();
	await seedChecklists();
	const lists = await db
		.select({ id: checklists.id, process: processes.code })
		.from(checklists)
		.innerJoin(processes, eq(processes.id, checklists.processId));
	await seedRulesAndAssignments({
		// KC-COG-MB checks process COG-MB.
		checks: Object.fromEntries(
			Object.entries(checks).map(([code, c]) => [code.replace(/^KC-/, ''), c.checkId])
		),
		checklists: Object.fromEntries(lists.map((l) => [l.process, l.id]))
	});
	await seedCertificates();
}

main()
	.catch((err) => {
		console.error(err);
		process.exitCode = 1;
	})
	.finally(() => pool.end());
