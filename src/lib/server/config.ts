// Server settings read from the environment, with the defaults the README documents.
// Plain process.env (not $env) so scripts run with tsx can import server modules too.
const e = process.env;

export const config = {
	authSecret: e.AUTH_SECRET ?? '',
	demo: e.PADBRIDGE_DEMO === '1',
	sessionHours: Number(e.SESSION_HOURS ?? 12),
	throttle: {
		windowMinutes: Number(e.SIGNIN_WINDOW_MINUTES ?? 15),
		perAccount: Number(e.SIGNIN_MAX_PER_ACCOUNT ?? 10),
		perAddress: Number(e.SIGNIN_MAX_PER_ADDRESS ?? 50)
	},
	/** Public certificate verification: lookups allowed per client address in the window. */
	verify: {
		windowMinutes: Number(e.VERIFY_WINDOW_MINUTES ?? 10),
		maxPerWindow: Number(e.VERIFY_MAX_PER_WINDOW ?? 30)
	},
	adminEmail: e.ADMIN_EMAIL,
	adminPassword: e.ADMIN_PASSWORD,
	plantName: e.PLANT_NAME ?? 'Kestrel Bay Optronics · KBO-2',
	/** The station gate answers deny `unavailable` when the database takes longer than this. */
	gateTimeoutMs: Number(e.GATE_TIMEOUT_MS ?? 1500),
	/** Zone used when a person has no site (should not happen in practice). */
	plantTimeZone: e.PLANT_TIME_ZONE ?? 'Asia/Ho_Chi_Minh',
	/** Short plant code used in certificate numbers. */
	plantCode: e.PLANT_CODE ?? 'KBO2',
	/** Base of links printed on certificates and in mail (the QR code's verify URL). */
	publicUrl: (e.PUBLIC_URL ?? e.ORIGIN ?? 'http://127.0.0.1:3000').replace(/\/+$/, ''),
	/**
	 * Outgoing mail over SMTP. Defaults point at the local catcher of `npm start`; a deployment sets
	 * the company relay. Auth is used only when SMTP_USER is set (SMTP_PASSWORD, or SMTP_PASS).
	 */
	smtp: {
		host: e.SMTP_HOST ?? '127.0.0.1',
		port: Number(e.SMTP_PORT ?? 2525),
		/** true = TLS from the first byte (port 465); false = plain, upgraded by STARTTLS if offered. */
		secure: e.SMTP_SECURE === 'true' || e.SMTP_SECURE === '1',
		user: e.SMTP_USER || undefined,
		password: e.SMTP_PASSWORD ?? e.SMTP_PASS ?? undefined
	},
	mailFrom: e.MAIL_FROM ?? 'Padbridge <padbridge@localhost>',
	/**
	 * This instance's name when several run behind a balancer: sent as X-Padbridge-Instance and
	 * written into job leases and mail claims. Letters, digits, dot, dash and underscore only.
	 */
	instanceName: /^[A-Za-z0-9._-]{1,40}$/.test(e.PADBRIDGE_INSTANCE ?? '')
		? e.PADBRIDGE_INSTANCE!
		: null
};
