// The whole guard matrix: the rows of guard-routes.ts and of every guard-routes-<area>.ts, and the
// routes that cannot be rows, each with the reason. tests/integration/route-inventory.test.ts
// checks that together they cover every route in src/routes.
import { GUARD_ROUTES, type GuardRoute } from './guard-routes';

const areaTables = import.meta.glob<{ GUARD_ROUTES: GuardRoute[] }>('./guard-routes-*.ts', {
	eager: true
});

export const GUARD_TABLE: GuardRoute[] = [
	...GUARD_ROUTES,
	...Object.values(areaTables).flatMap((m) => m.GUARD_ROUTES)
];

export interface GuardExemption {
	/** As `describeRoute` (tests/helpers/route-inventory.ts) writes it. */
	route: string;
	reason: string;
}

export const GUARD_EXEMPTIONS: GuardExemption[] = [
	{
		route: 'POST /signout',
		reason:
			'Signing out revokes the session the rest of the matrix signs in with; sessions.test.ts covers it'
	},
	{
		route: 'POST /records/retention?/dryRun',
		reason:
			'It takes no input, so an allowed visitor would record a retention run; retention.test.ts checks who is refused'
	}
];
// Not in src/routes, so not in the inventory: Auth.js answers /auth/* inside the auth hook; the app's
// own sign-in and sign-out forms are the way in and out, and headers.test.ts checks those answers.
