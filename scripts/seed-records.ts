// Demo data for retention: three former employees (one long past the training-records period, one
// past it but under a legal hold for a customer claim, one who left recently) and gate log rows
// from years ago, so a dry run on the demo plant has something to show.
import { eq, inArray } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import {
	gateChecks,
	legalHolds,
	lines,
	people,
	roleAssignments,
	sites,
	stations
} from '../src/lib/server/db/schema/index';
import { recordAudit } from '../src/lib/server/audit/index';
import { addMonthsToDate } from '../src/lib/server/certificates/issue';
import { localDate, zonedToUtc } from '../src/lib/time';

const LEAVERS = [
	{ name: 'Đinh Văn Hậu', no: 'E19871', badge: 'KB-09871', line: 'L1', leftMonthsAgo: 136 },
	{
		name: 'Siti Rahmawati',
		no: 'E19904',
		badge: 'KB-09904',
		line: 'L2',
		leftMonthsAgo: 127,
		hold: 'Customer claim 8D-2291 (7" LCD, FOG lots of that period): keep the bonding and training records until the claim is closed.'
	},
	{ name: 'Oleksandr Marchenko', no: 'E19955', badge: 'KB-09955', line: 'L2', leftMonthsAgo: 17 }
];

export async function seedRecords(): Promise<void> {
	const [site] = await db.select().from(sites).where(eq(sites.code, 'KBO-2'));
	const zone = site.timeZone;
	const today = localDate(new Date(), zone);
	const lineRows = await db.select({ id: lines.id, code: lines.code }).from(lines);
	const [hr] = await db
		.select({ id: people.id, name: people.displayName })
		.from(people)
		.where(eq(people.email, 'hr@kbo2.example'));
	const stationRows = await db
		.select({ id: stations.id, code: stations.code })
		.from(stations)
		.where(inArray(stations.code, ['L1-COG-01', 'L2-FOG-03']));
	const stationFor = (line: string) => stationRows.find((s) => s.code.startsWith(line))!;

	await db.transaction(async (tx) => {
		for (const l of LEAVERS) {
			const endedOn = addMonthsToDate(today, -l.leftMonthsAgo);
			const [{ id }] = await tx
				.insert(people)
				.values({
					employeeNo: l.no,
					displayName: l.name,
					badgeNo: l.badge,
					locale: 'en',
					siteId: site.id,
					lineId: lineRows.find((r) => r.code === l.line)!.id,
					active: false,
					employmentEndedOn: endedOn,
					sessionVersion: 2
				})
				.$returningId();
			await tx.insert(roleAssignments).values({ personId: id, role: 'operator' });
			await recordAudit(tx, null, {
				action: 'demo.leaver',
				entityType: 'person',
				entityId: id,
				newValues: { active: false, employmentEndedOn: endedOn },
				reason: 'demo: a former operator'
			});
			if (l.hold) {
				const placedAt = zonedToUtc(addMonthsToDate(today, -2), '09:30', zone);
				const [{ id: holdId }] = await tx
					.insert(legalHolds)
					.values({ personId: id, reason: l.hold, placedBy: hr.id, placedAt })
					.$returningId();
				await recordAudit(
					tx,
					{ id: hr.id, label: hr.name },
					{
						action: 'legal_hold.placed',
						entityType: 'legal_hold',
						entityId: holdId,
						newValues: { personId: id, placedAt: placedAt.toISOString() },
						reason: l.hold
					}
				);
			}
			// Shifts in their last months: four checks a month at the line's bonder, allowed.
			const station = stationFor(l.line);
			const rows = [];
			for (let m = 1; m <= 6; m++) {
				for (const day of [3, 10, 17, 24]) {
					const date = addMonthsToDate(endedOn, -m).slice(0, 8) + String(day).padStart(2, '0');
					rows.push({
						at: zonedToUtc(date, '06:05', zone),
						stationId: station.id,
						stationCode: station.code,
						badge: l.badge,
						personId: id,
						decision: 'allow' as const,
						reasons: [],
						warnings: [],
						source: 'kiosk' as const,
						latencyMs: 12
					});
				}
			}
			await tx.insert(gateChecks).values(rows);
		}
		// Unknown badges scanned four years ago: nobody behind them, gone with the gate-log period.
		const l2 = stationFor('L2');
		await tx.insert(gateChecks).values(
			[5, 12, 19].map((day) => ({
				at: zonedToUtc(
					addMonthsToDate(today, -48).slice(0, 8) + String(day).padStart(2, '0'),
					'22:10',
					zone
				),
				stationId: l2.id,
				stationCode: l2.code,
				badge: `KB-0${day}77`,
				personId: null,
				decision: 'deny' as const,
				reasons: [{ code: 'unknown_badge' }],
				warnings: [],
				source: 'kiosk' as const,
				latencyMs: 9
			}))
		);
	});
	console.log(`${LEAVERS.length} former employees and their old gate log rows loaded`);
}
