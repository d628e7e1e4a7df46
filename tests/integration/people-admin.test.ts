// The person form refuses bad references and duplicates with a field error (never a 500), and
// saves a person with no line or shift from the form's "none" choice.
import { randomBytes } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { appDb, createTestPerson, queryRows } from '../helpers/db';
import { useDemoSession } from '../helpers/lifecycle';

const admin = useDemoSession('admin');

function newPerson(overrides: Record<string, string | string[]> = {}) {
	const tag = randomBytes(4).toString('hex').toUpperCase();
	return {
		employeeNo: `PA-${tag}`,
		displayName: `Form test ${tag}`,
		email: '',
		badgeNo: `PA-${tag}`,
		locale: 'en',
		employmentType: 'employee',
		agencyName: '',
		contractEndsOn: '',
		// What the "— none —" choices post.
		lineId: '',
		shiftId: '',
		roles: ['operator'],
		...overrides
	};
}

async function peopleWith(employeeNo: string) {
	return queryRows<{ id: number; line_id: number | null; shift_id: number | null }>(
		appDb(),
		'SELECT id, line_id, shift_id FROM people WHERE employee_no = ?',
		[employeeNo]
	);
}

describe('adding a person through the form', () => {
	it('saves a person with no line and no shift', async () => {
		const fields = newPerson();
		const res = await admin.client.postForm('/admin/people/new?/save', fields);
		expect(res.status).toBe(303);
		const [row] = await peopleWith(fields.employeeNo);
		expect(res.headers.get('location')).toBe(`/admin/people/${row.id}?created=1`);
		expect(row).toMatchObject({ line_id: null, shift_id: null });
		await appDb().query('UPDATE people SET active = 0 WHERE id = ?', [row.id]);
	});

	it('answers a line that does not exist with a field error, not a server error', async () => {
		const fields = newPerson({ lineId: '999999' });
		const res = await admin.client.postForm('/admin/people/new?/save', fields);
		expect(res.status).toBe(409);
		const html = await res.text();
		expect(html).toContain('That line does not exist');
		// What was typed comes back in the form.
		expect(html).toContain(`value="${fields.displayName}"`);
		expect(await peopleWith(fields.employeeNo)).toEqual([]);
	});

	it('answers a shift that does not exist with a field error', async () => {
		const fields = newPerson({ shiftId: '999999' });
		const res = await admin.client.postForm('/admin/people/new?/save', fields);
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('That shift does not exist');
	});

	it('answers a badge number already in use with a field error', async () => {
		const taken = await createTestPerson({ roles: ['operator'] });
		const res = await admin.client.postForm(
			'/admin/people/new?/save',
			newPerson({ badgeNo: taken.badge! })
		);
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('Another person already has this badge number');
	});

	it('answers an e-mail address or employee number already in use on their own fields', async () => {
		const taken = await createTestPerson({ roles: ['operator'] });
		const byEmail = await admin.client.postForm(
			'/admin/people/new?/save',
			newPerson({ email: taken.email!.toUpperCase() })
		);
		expect(byEmail.status).toBe(409);
		expect(await byEmail.text()).toContain('Another person already has this e-mail address');
		const byNumber = await admin.client.postForm(
			'/admin/people/new?/save',
			newPerson({ employeeNo: taken.employeeNo })
		);
		expect(byNumber.status).toBe(409);
		expect(await byNumber.text()).toContain('Another person already has this employee number');
	});

	it('answers the same on edit', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const res = await admin.client.postForm(
			`/admin/people/${p.id}?/save`,
			newPerson({ employeeNo: p.employeeNo, badgeNo: p.badge!, lineId: '999999' })
		);
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('That line does not exist');
	});
});
