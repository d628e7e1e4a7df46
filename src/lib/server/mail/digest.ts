// The daily digest for line leads: one message per lead and plant day (from 06:00 plant time),
// listing for the people on their line who have no e-mail address
//   - "new since the last digest": the notices held for the digest (see outbox.ts), which are
//     folded into it (claimed_by = digest:<digest row id>) and count as sent when it is sent;
//   - "still open": certificates expiring within their rule's reminder window or retraining due,
//     and open assignments due within 14 days (or overdue) without a qualifying certificate.
// Nothing to report → no digest that day (a later hourly run still sends one if something comes).
import { and, eq, inArray, isNotNull, isNull, lte, sql } from 'drizzle-orm';
import { db } from '../db';
import {
	assignments,
	certificates,
	certificationRules,
	lines,
	mailOutbox,
	people,
	processes,
	roleAssignments
} from '../db/schema';
import { siteZoneOf } from '../certificates/issue';
import { expiringWindowDays } from '../training/rules';
import { daysToExpiry, deriveCertificateStatus, isQualifying } from '../../training/status';
import { localDate, zonedToUtc } from '../../time';
import { addDays, DIGEST_HOLD, DIGEST_TIME, queueMail } from './outbox';
import { FOLDED_UNTIL } from './send';
import { renderDigest, type DigestItem } from './templates';

export interface DigestResult {
	digests: number;
	folded: number;
}

export async function queueLeadDigests(now: Date = new Date()): Promise<DigestResult> {
	const leads = await db
		.select({
			id: people.id,
			name: people.displayName,
			lineId: people.lineId,
			line: lines.code
		})
		.from(people)
		.innerJoin(
			roleAssignments,
			and(eq(roleAssignments.personId, people.id), eq(roleAssignments.role, 'lead'))
		)
		.innerJoin(lines, eq(lines.id, people.lineId))
		.where(and(eq(people.active, true), isNotNull(people.email)))
		.orderBy(people.id);
	const byLine = new Map<number, typeof leads>();
	for (const l of leads) byLine.set(l.lineId!, [...(byLine.get(l.lineId!) ?? []), l]);

	const result: DigestResult = { digests: 0, folded: 0 };
	for (const [lineId, lineLeads] of byLine) {
		const zone = await siteZoneOf(lineLeads[0].id, db);
		const today = localDate(now, zone);
		if (now.getTime() < zonedToUtc(today, DIGEST_TIME, zone).getTime()) continue;
		const keyOf = (leadId: number) => `lead_digest:${leadId}:${today}`;
		const sentToday = new Set(
			(
				await db
					.select({ k: mailOutbox.dedupeKey })
					.from(mailOutbox)
					.where(
						inArray(
							mailOutbox.dedupeKey,
							lineLeads.map((l) => keyOf(l.id))
						)
					)
			).map((r) => r.k)
		);
		const pending = lineLeads.filter((l) => !sentToday.has(keyOf(l.id)));
		if (!pending.length) continue;

		const crew = await db
			.select({ id: people.id, name: people.displayName, badge: people.badgeNo })
			.from(people)
			.where(and(eq(people.lineId, lineId), eq(people.active, true), isNull(people.email)));
		if (!crew.length) continue;
		const crewById = new Map(crew.map((c) => [c.id, c]));
		const open = await openNeeds(crewById, now, today, zone);

		const r = await db.transaction(async (tx) => {
			const held = await tx
				.select({ id: mailOutbox.id, about: mailOutbox.aboutPersonId, subject: mailOutbox.subject })
				.from(mailOutbox)
				.where(
					and(
						eq(mailOutbox.claimedBy, DIGEST_HOLD),
						isNull(mailOutbox.sentAt),
						inArray(mailOutbox.aboutPersonId, [...crewById.keys()])
					)
				)
				.orderBy(mailOutbox.id)
				.for('update', { skipLocked: true });
			const fresh: DigestItem[] = held.map((h) => {
				const p = crewById.get(h.about!)!;
				const suffix = ` (for ${p.name})`;
				const need = h.subject.endsWith(suffix) ? h.subject.slice(0, -suffix.length) : h.subject;
				return { personName: p.name, badge: p.badge, need };
			});
			if (!fresh.length && !open.length) return { digests: 0, folded: 0 };
			let firstId: number | null = null;
			let digests = 0;
			for (const lead of pending) {
				const c = renderDigest(lead.name, today, lead.line, fresh, open);
				const q = await queueMail(tx, {
					kind: 'lead_digest',
					dedupeKey: keyOf(lead.id),
					toPersonId: lead.id,
					now,
					...c
				});
				if (!q.queued) continue;
				digests++;
				if (firstId == null) {
					const [row] = await tx
						.select({ id: mailOutbox.id })
						.from(mailOutbox)
						.where(eq(mailOutbox.dedupeKey, keyOf(lead.id)));
					firstId = row.id;
				}
			}
			if (firstId == null || !held.length) return { digests, folded: 0 };
			await tx
				.update(mailOutbox)
				.set({ claimedBy: `digest:${firstId}`, claimedUntil: FOLDED_UNTIL })
				.where(
					and(
						inArray(
							mailOutbox.id,
							held.map((h) => h.id)
						),
						eq(mailOutbox.claimedBy, DIGEST_HOLD)
					)
				);
			return { digests, folded: held.length };
		});
		result.digests += r.digests;
		result.folded += r.folded;
	}
	return result;
}

/** What the crew still has to do, as one line per item. */
async function openNeeds(
	crew: Map<number, { id: number; name: string; badge: string | null }>,
	now: Date,
	today: string,
	zone: string
): Promise<DigestItem[]> {
	const ids = [...crew.keys()];
	const certs = await db
		.select({
			personId: certificates.personId,
			processId: certificates.processId,
			processCode: processes.code,
			state: certificates.state,
			expiresAt: certificates.expiresAt,
			graceUntil: certificates.graceUntil,
			reminderDays: certificationRules.reminderDays
		})
		.from(certificates)
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.where(
			and(
				inArray(certificates.personId, ids),
				inArray(certificates.state, ['active', 'retraining_due'])
			)
		);
	const items: (DigestItem & { sort: string })[] = [];
	const qualified = new Set<string>();
	for (const c of certs) {
		const status = deriveCertificateStatus(c, now, expiringWindowDays(c));
		if (isQualifying(status)) qualified.add(`${c.personId}:${c.processId}`);
		const p = crew.get(c.personId)!;
		const through = localDate(new Date(c.expiresAt.getTime() - 1), zone);
		let need: string | null = null;
		if (status === 'expiring')
			need = `${c.processCode} certificate valid through ${through} (${daysToExpiry(c.expiresAt, now)} days left): renew it`;
		else if (status === 'retraining_due')
			need = `${c.processCode} retraining due: grace ends ${localDate(c.graceUntil!, zone)}`;
		else if (status === 'retraining_overdue')
			need = `${c.processCode} retraining overdue: the station gate denies ${c.processCode}`;
		if (need) items.push({ personName: p.name, badge: p.badge, need, sort: through });
	}
	const horizon = addDays(today, 14);
	const due = await db
		.select({
			personId: assignments.personId,
			processId: assignments.processId,
			processCode: processes.code,
			dueOn: assignments.dueOn
		})
		.from(assignments)
		.innerJoin(processes, eq(processes.id, assignments.processId))
		.where(
			and(
				inArray(assignments.personId, ids),
				isNull(assignments.closedAt),
				isNotNull(assignments.dueOn),
				lte(assignments.dueOn, horizon)
			)
		)
		.orderBy(sql`${assignments.dueOn}`);
	for (const a of due) {
		if (qualified.has(`${a.personId}:${a.processId}`)) continue;
		const p = crew.get(a.personId)!;
		const overdue = a.dueOn! < today;
		items.push({
			personName: p.name,
			badge: p.badge,
			need: `${a.processCode} training ${overdue ? 'overdue since' : 'due'} ${a.dueOn}`,
			sort: a.dueOn!
		});
	}
	return items
		.sort((a, b) => a.sort.localeCompare(b.sort) || a.personName.localeCompare(b.personName))
		.map(({ sort: _s, ...i }) => i);
}
