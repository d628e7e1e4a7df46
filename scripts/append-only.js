// Tables the app may only append to and read: MariaDB refuses the app user's UPDATE and DELETE on
// them (grantAppUser in lib.js). Kept apart so tests can import it without the rest of the scripts.
export const APPEND_ONLY_TABLES = [
	'audit_events',
	'gate_checks',
	'signatures',
	'acknowledgements',
	'certificate_basis',
	'retention_dispositions'
];
