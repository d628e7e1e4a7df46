// People and gate log rows for the retention and leaver tests, written straight into the test
// database: leavers whose employment ended on a given day, and gate decisions at given instants.
import type { ResultSetHeader } from 'mysql2/promise';
import { appDb, createTestPerson, queryRows, type TestPerson } from './db';

/** A person who left on `endedOn` (inactive, employment ended that plant day). */
export async function createLeaver(endedOn: string, name?: string): Promise<TestPerson> {
	const p = await createTestPerson({ roles: ['operator'], displayName: name });
	await appDb().query(
		'UPDATE people SET active = 0, employment_ended_on = ?, session_version = session_version + 1 WHERE id = ?',
		[endedOn, p.id]
	);
	return p;
}

/** Gate decisions for the person (or an unknown badge) at the given instants; returns their ids. */
export async function insertGateRows(
	person: { id: number | null; badge: string | null },
	ats: Date[],
	stationCode = 'L2-FOG-03'
): Promise<number[]> {
	const ids: number[] = [];
	for (const at of ats) {
		const [res] = await appDb().query<ResultSetHeader>(
			`INSERT INTO gate_checks (at, station_id, station_code, badge, person_id, decision, reasons,
			   warnings, source, latency_ms)
			 VALUES (?, (SELECT id FROM stations WHERE code = ?), ?, ?, ?, 'allow', '[]', '[]', 'kiosk', 5)`,
			[at, stationCode, stationCode, person.badge ?? 'NONE', person.id]
		);
		ids.push(res.insertId);
	}
	return ids;
}

export interface PersonSnapshot {
	display_name: string;
	employee_no: string;
	email: string | null;
	badge_no: string | null;
	locale: string;
	active: number;
	employment_ended_on: string | null;
	anonymised_at: Date | null;
	password_hash: string | null;
	pin_hash: string | null;
	session_version: number;
}

export async function personRow(id: number): Promise<PersonSnapshot> {
	const [row] = await queryRows<PersonSnapshot>(
		appDb(),
		`SELECT display_name, employee_no, email, badge_no, locale, active,
		   DATE_FORMAT(employment_ended_on, '%Y-%m-%d') AS employment_ended_on, anonymised_at,
		   password_hash, pin_hash, session_version
		 FROM people WHERE id = ?`,
		[id]
	);
	return row;
}

/** The ids and badges of gate rows with these ids that still exist. */
export async function gateRows(ids: number[]): Promise<{ id: number; badge: string }[]> {
	if (!ids.length) return [];
	return queryRows<{ id: number; badge: string }>(
		appDb(),
		'SELECT id, badge FROM gate_checks WHERE id IN (?) ORDER BY id',
		[ids]
	);
}

/** The instant `days` days before now. */
export const daysAgo = (days: number) => new Date(Date.now() - days * 86_400_000);
