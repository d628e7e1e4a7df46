// The calculators API against the built server (TEST_APP_URL) and the real test database: every
// calculator with good and bad input, authentication by session and by API key, and refusals.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import {
	createApiKey,
	hashApiKey,
	revokeApiKey,
	rotateApiKey,
	verifyApiKey
} from '../../src/lib/server/apikeys';
import { db, pool } from '../../src/lib/server/db';
import { apiKeys, auditEvents, people } from '../../src/lib/server/db/schema';
import type { Actor } from '../../src/lib/server/audit';
import { calculatorIds, runCalculator } from '../../src/lib/calculators/registry';
import { sessionCookie } from '../helpers/http-session';

// The demo sign-in of scripts/demo-accounts.js (that file is plain JS outside the type check).
const DEMO_PASSWORD = 'kestrel-bay-demo-2026';
const BASE = process.env.TEST_APP_URL ?? '';
if (!BASE) throw new Error('TEST_APP_URL is not set: run this through npm test');

let cookie = '';
let actor: Actor;
const createdKeyIds: number[] = [];

const jsonHeaders = (extra: Record<string, string> = {}) => ({
	'content-type': 'application/json',
	origin: BASE,
	...extra
});

async function post(id: string, body: unknown, headers: Record<string, string> = {}) {
	const res = await fetch(`${BASE}/api/v1/calculators/${id}`, {
		method: 'POST',
		headers: jsonHeaders({ cookie, ...headers }),
		body: typeof body === 'string' ? body : JSON.stringify(body)
	});
	return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}

async function postWithKey(
	id: string,
	body: unknown,
	key: string,
	headers: Record<string, string> = {}
) {
	// A machine: no cookie and (unless given) no Origin header, only the key.
	const res = await fetch(`${BASE}/api/v1/calculators/${id}`, {
		method: 'POST',
		headers: { 'content-type': 'application/json', authorization: `Bearer ${key}`, ...headers },
		body: JSON.stringify(body)
	});
	return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}

beforeAll(async () => {
	cookie = await sessionCookie('trainer@kbo2.example', DEMO_PASSWORD);
	const [admin] = await db
		.select({ id: people.id })
		.from(people)
		.where(eq(people.email, 'admin@kbo2.example'));
	actor = { id: admin.id, label: 'Calculators API integration test', address: '127.0.0.1' };
});

afterAll(async () => {
	// Leave no live key behind.
	for (const id of createdKeyIds) {
		const [row] = await db.select().from(apiKeys).where(eq(apiKeys.id, id));
		if (row && !row.revokedAt) await revokeApiKey(actor, id, 'end of the integration test');
	}
	await pool.end();
});

// Good input per calculator, with a check value where one is published.
const goodInputs: Record<(typeof calculatorIds)[number], Record<string, unknown>> = {
	'bond-force': {
		basis: 'bump',
		bumpCount: 1000,
		bumpWidthUm: 18,
		bumpLengthUm: 90,
		pressureMPa: 78.4532,
		cylinderBoreMm: 40,
		headWeightN: 20
	},
	'particle-capture': {
		densityPerMm2: 10000,
		bumpWidthUm: 20,
		bumpLengthUm: 100,
		captureRatio: 0.25,
		minParticles: 3,
		bumpCount: 1,
		targetProbability: 0.001
	},
	'bridge-risk': {
		gapDensityPerMm2: 20000,
		particleDiameterUm: 4,
		gapUm: 10,
		overlapLengthUm: 100,
		gapCount: 800
	},
	'cure-degree': {
		model: 'nth-order',
		preExponentialPerS: 2.5e8,
		activationEnergyKJPerMol: 80,
		order: 1,
		segments: [
			{ startC: 25, endC: 185, durationS: 3 },
			{ startC: 185, endC: 185, durationS: 12 }
		],
		targetDegree: 0.9
	},
	'pitch-compensation': {
		glassPitchMm: 0.05,
		padCount: 400,
		fpcCtePpmPerK: 20,
		fpcDeltaTK: 150,
		glassCtePpmPerK: 3.2,
		glassDeltaTK: 60
	},
	'head-offset': {
		points: [
			{ setpointC: 200, measuredC: 167.5 },
			{ setpointC: 240, measuredC: 200.6 }
		],
		targetC: 185
	},
	units: { quantity: 'pressure', value: 800, from: 'kgf/cm²', to: 'MPa' }
};

// Bad input per calculator, and the field that must carry the error.
const badInputs: Record<(typeof calculatorIds)[number], [Record<string, unknown>, string]> = {
	'bond-force': [{ basis: 'tool', lengthMm: 30, pressureMPa: 3 }, 'widthMm'],
	'particle-capture': [{ ...goodInputs['particle-capture'], captureRatio: 1.5 }, 'captureRatio'],
	'bridge-risk': [{ ...goodInputs['bridge-risk'], gapUm: -10 }, 'gapUm'],
	'cure-degree': [{ ...goodInputs['cure-degree'], segments: [] }, 'segments'],
	'pitch-compensation': [{ ...goodInputs['pitch-compensation'], padCount: 1 }, 'padCount'],
	'head-offset': [
		{
			points: [
				{ setpointC: 220, measuredC: 180 },
				{ setpointC: 220, measuredC: 182 }
			],
			targetC: 185
		},
		'points'
	],
	units: [{ quantity: 'pressure', value: 5, from: 'N', to: 'MPa' }, 'from']
};

describe('GET /api/v1/calculators', () => {
	it('lists the registry with units, ranges, outputs and sources', async () => {
		const res = await fetch(`${BASE}/api/v1/calculators`, { headers: { cookie } });
		expect(res.status).toBe(200);
		const body = (await res.json()) as {
			caution: string;
			calculators: {
				id: string;
				title: string;
				endpoint: string;
				inputs: { name: string; unit: string; min?: number; max?: number }[];
				outputs: { name: string; unit: string }[];
				sources: { citation: string }[];
			}[];
		};
		expect(body.calculators.map((c) => c.id)).toEqual([...calculatorIds]);
		expect(body.caution).toMatch(/validated recipe govern/);
		const bond = body.calculators.find((c) => c.id === 'bond-force')!;
		expect(bond.title).toBe('Bond force');
		expect(bond.endpoint).toBe('/api/v1/calculators/bond-force');
		expect(bond.inputs.find((i) => i.name === 'bumpWidthUm')).toMatchObject({ unit: 'µm', min: 0 });
		expect(bond.outputs.find((o) => o.name === 'forceKgf')?.unit).toBe('kgf');
		expect(bond.sources.some((s) => s.citation.includes('Jeng and Hsieh'))).toBe(true);
		for (const calculator of body.calculators) expect(calculator.sources.length).toBeGreaterThan(0);
	});

	it('answers 401 without a session or key', async () => {
		const res = await fetch(`${BASE}/api/v1/calculators`);
		expect(res.status).toBe(401);
		expect(res.headers.get('www-authenticate')).toMatch(/^Bearer/);
		expect(await res.json()).toHaveProperty('error');
	});
});

describe('POST /api/v1/calculators/<id> with a session', () => {
	for (const id of calculatorIds) {
		it(`${id}: good input gives the registry's outputs`, async () => {
			const { status, body } = await post(id, goodInputs[id]);
			expect(status).toBe(200);
			const local = runCalculator(id, goodInputs[id]);
			if (!local.ok) throw new Error(local.error);
			expect(body).toEqual(
				JSON.parse(JSON.stringify({ outputs: local.outputs, warnings: local.warnings }))
			);
		});

		it(`${id}: bad input gives 400 with a field error`, async () => {
			const [input, field] = badInputs[id];
			const { status, body } = await post(id, input);
			expect(status).toBe(400);
			expect(typeof body.error).toBe('string');
			expect(Object.keys(body.fields as object)).toContain(field);
		});
	}

	it('gives the published check values', async () => {
		// Jeng & Hsieh (2001): 800 kgf/cm² is 78.4532 MPa (NIST SP 811 factor 98 066.5 Pa, exact)
		const units = await post('units', goodInputs.units);
		expect((units.body.outputs as { value: number }).value).toBeCloseTo(78.4532, 10);
		// λ = 10 000 /mm² × 0.002 mm² × 0.25 = 5; P(N < 3) = 0.1246520 (any Poisson table)
		const capture = await post('particle-capture', goodInputs['particle-capture']);
		const outputs = capture.body.outputs as { meanPerBump: number; probBumpBelowMin: number };
		expect(outputs.meanPerBump).toBeCloseTo(5, 12);
		expect(outputs.probBumpBelowMin).toBeCloseTo(0.124652, 6);
		// 1000 × 18 µm × 90 µm = 1.62 mm²; × 78.4532 MPa = 127.094184 N (arithmetic)
		const bond = await post('bond-force', goodInputs['bond-force']);
		expect((bond.body.outputs as { forceN: number }).forceN).toBeCloseTo(127.094184, 9);
	});

	it('returns warnings beside the outputs (gap below three particle diameters)', async () => {
		const { status, body } = await post('bridge-risk', goodInputs['bridge-risk']);
		expect(status).toBe(200);
		expect((body.warnings as string[]).join(' ')).toMatch(/less than three particle diameters/);
	});

	it('refuses invalid JSON, a body that is not an object, and other content types', async () => {
		const broken = await post('units', '{"quantity": "pressure",');
		expect(broken.status).toBe(400);
		expect(broken.body).toEqual({ error: 'The request body is not valid JSON.', fields: {} });
		const list = await post('units', [1, 2, 3]);
		expect(list.status).toBe(400);
		expect(list.body.fields).toEqual({});
		const text = await fetch(`${BASE}/api/v1/calculators/units`, {
			method: 'POST',
			headers: { 'content-type': 'text/plain', origin: BASE, cookie },
			body: 'value=800'
		});
		expect(text.status).toBe(415);
		expect(await text.json()).toHaveProperty('error');
	});

	it('answers 404 with { error } for an unknown calculator', async () => {
		const { status, body } = await post('solder-volume', { value: 1 });
		expect(status).toBe(404);
		expect(body.error).toMatch(/Unknown calculator "solder-volume"/);
	});

	it('answers 401 without a session', async () => {
		const res = await fetch(`${BASE}/api/v1/calculators/units`, {
			method: 'POST',
			headers: jsonHeaders(),
			body: JSON.stringify(goodInputs.units)
		});
		expect(res.status).toBe(401);
		expect(await res.json()).toHaveProperty('error');
	});

	it('refuses a cross-origin POST that carries the session cookie', async () => {
		const { status, body } = await post('units', goodInputs.units, {
			origin: 'http://evil.example'
		});
		expect(status).toBe(403);
		expect(body.error).toMatch(/Cross-site/);
		const noOrigin = await fetch(`${BASE}/api/v1/calculators/units`, {
			method: 'POST',
			headers: { 'content-type': 'application/json', cookie, 'sec-fetch-site': 'cross-site' },
			body: JSON.stringify(goodInputs.units)
		});
		expect(noOrigin.status).toBe(403);
	});
});

describe('API keys', () => {
	it('stores only the SHA-256 and a prefix, audits the creation and works as a Bearer key', async () => {
		const issued = await createApiKey(actor, {
			name: 'Integration test MES',
			scope: 'calculators'
		});
		createdKeyIds.push(issued.id);
		expect(issued.key).toMatch(/^pbk_[A-Za-z0-9_-]{43}$/);
		expect(issued.key.startsWith(issued.prefix)).toBe(true);
		const [row] = await db.select().from(apiKeys).where(eq(apiKeys.id, issued.id));
		expect(row.secretHash).toBe(hashApiKey(issued.key));
		expect(row.secretHash).not.toContain(issued.key.slice(4, 20));
		expect(row.lastUsedAt).toBeNull();
		const [audit] = await db
			.select()
			.from(auditEvents)
			.where(
				and(eq(auditEvents.action, 'api_key.create'), eq(auditEvents.entityId, String(issued.id)))
			);
		expect(audit.actorId).toBe(actor.id);
		expect(JSON.stringify(audit.newValues)).not.toContain(issued.key);

		const { status, body } = await postWithKey('units', goodInputs.units, issued.key);
		expect(status).toBe(200);
		expect((body.outputs as { value: number }).value).toBeCloseTo(78.4532, 10);
		const [used] = await db.select().from(apiKeys).where(eq(apiKeys.id, issued.id));
		expect(used.lastUsedAt).toBeInstanceOf(Date);

		const list = await fetch(`${BASE}/api/v1/calculators`, {
			headers: { authorization: `Bearer ${issued.key}` }
		});
		expect(list.status).toBe(200);
	});

	it('refuses a revoked key, and the revocation is audited with its reason', async () => {
		const issued = await createApiKey(actor, {
			name: 'Integration test, to revoke',
			scope: 'calculators'
		});
		createdKeyIds.push(issued.id);
		expect((await postWithKey('units', goodInputs.units, issued.key)).status).toBe(200);
		await revokeApiKey(actor, issued.id, 'leaked in a log file');
		const refused = await postWithKey('units', goodInputs.units, issued.key);
		expect(refused.status).toBe(401);
		expect(refused.body).toHaveProperty('error');
		expect(await verifyApiKey(`Bearer ${issued.key}`, 'calculators')).toBeNull();
		const [audit] = await db
			.select()
			.from(auditEvents)
			.where(
				and(eq(auditEvents.action, 'api_key.revoke'), eq(auditEvents.entityId, String(issued.id)))
			);
		expect(audit.reason).toBe('leaked in a log file');
		await expect(revokeApiKey(actor, issued.id, 'again')).rejects.toThrow(/already revoked/);
	});

	it('rotates: the old key stops working and the new one works', async () => {
		const first = await createApiKey(actor, {
			name: 'Integration test, rotated',
			scope: 'calculators'
		});
		createdKeyIds.push(first.id);
		const second = await rotateApiKey(actor, first.id, 'yearly rotation');
		createdKeyIds.push(second.id);
		expect(second.key).not.toBe(first.key);
		expect(second.name).toBe(first.name);
		expect((await postWithKey('units', goodInputs.units, first.key)).status).toBe(401);
		expect((await postWithKey('units', goodInputs.units, second.key)).status).toBe(200);
	});

	it('refuses a key of another scope, a malformed key and a bad key sent beside a good cookie', async () => {
		const gate = await createApiKey(actor, { name: 'Integration test gate key', scope: 'gate' });
		createdKeyIds.push(gate.id);
		expect((await postWithKey('units', goodInputs.units, gate.key)).status).toBe(401);
		expect(await verifyApiKey(`Bearer ${gate.key}`, 'gate')).toMatchObject({ id: gate.id });
		expect((await postWithKey('units', goodInputs.units, 'pbk_short')).status).toBe(401);
		const mixed = await post('units', goodInputs.units, {
			authorization: `Bearer pbk_${'x'.repeat(43)}`
		});
		expect(mixed.status).toBe(401);
	});

	it('works across origins, since a key is not a cookie the browser adds by itself', async () => {
		const issued = await createApiKey(actor, {
			name: 'Integration test HMI',
			scope: 'calculators'
		});
		createdKeyIds.push(issued.id);
		const res = await postWithKey('units', goodInputs.units, issued.key, {
			origin: 'http://hmi.l2.example'
		});
		expect(res.status).toBe(200);
	});
});
