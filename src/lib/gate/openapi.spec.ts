// The published gate description (static/openapi/gate.json and the help page) must name every
// reason and warning the decision can give, and nothing it cannot.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { GATE_REASON_CODES, GATE_WARNING_CODES } from './decide';

const openapi = JSON.parse(readFileSync('static/openapi/gate.json', 'utf8'));
const help = readFileSync('content/help/station-gate.md', 'utf8');

describe('gate API description', () => {
	it('is OpenAPI 3.1 with the check operation and its statuses', () => {
		expect(openapi.openapi).toBe('3.1.0');
		const op = openapi.paths['/api/v1/gate/checks'].post;
		expect(Object.keys(op.responses).sort()).toEqual(['200', '400', '401', '403', '415', '503']);
		expect(openapi.components.securitySchemes.stationKey.scheme).toBe('bearer');
	});

	it('lists exactly the reason and warning codes of decideGate, each described', () => {
		const reason = openapi.components.schemas.GateReason.properties.code;
		expect([...reason.enum].sort()).toEqual([...GATE_REASON_CODES].sort());
		for (const code of GATE_REASON_CODES) {
			expect(reason.description).toContain(`\`${code}\`:`);
			expect(help).toContain(`| \`${code}\``);
		}
		const warning = openapi.components.schemas.GateWarning.properties.code;
		expect([...warning.enum].sort()).toEqual([...GATE_WARNING_CODES].sort());
		for (const code of GATE_WARNING_CODES) expect(help).toContain(`| \`${code}\``);
	});
});
