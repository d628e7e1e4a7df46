// The demo sign-ins, one per role, used by the seed and printed by `npm start`. Demo data only:
// production mode never creates these (see README, ADMIN_EMAIL / ADMIN_PASSWORD).
export const DEMO_PASSWORD = 'kestrel-bay-demo-2026';

export const DEMO_ACCOUNTS = [
	{ role: 'admin', name: 'Tomasz Wójcik', email: 'admin@kbo2.example' },
	{ role: 'quality', name: 'Nguyễn Thị Minh Châu', email: 'quality@kbo2.example' },
	{ role: 'trainer', name: 'Lê Văn Hùng', email: 'trainer@kbo2.example' },
	{ role: 'lead', name: '陈晓燕', email: 'lead.l1@kbo2.example' },
	{ role: 'hr', name: 'Sofía Herrera', email: 'hr@kbo2.example' },
	{ role: 'operator', name: 'Trần Thị Thu Hà', badge: 'KB-10421', pin: '204816' }
];

export function demoSignIns() {
	const rows = DEMO_ACCOUNTS.map((a) =>
		a.email
			? [a.role, a.name, `${a.email}`, DEMO_PASSWORD]
			: [a.role, a.name, `badge ${a.badge}`, `PIN ${a.pin}`]
	);
	const head = ['role', 'name', 'sign in with', 'secret'];
	const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => [...r[i]].length)));
	const fmt = (r) =>
		'  | ' + r.map((c, i) => c + ' '.repeat(widths[i] - [...c].length)).join(' | ') + ' |';
	const sep = '  |' + widths.map((w) => '-'.repeat(w + 2)).join('|') + '|';
	return [fmt(head), sep, ...rows.map(fmt)].join('\n');
}
