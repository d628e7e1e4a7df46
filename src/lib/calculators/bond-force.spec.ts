import { describe, expect, it } from 'vitest';
import { bondForceSchema, computeBondForce, type BondForceOutput } from './bond-force';
import { runCalculator } from './registry';

function relativeError(actual: number, expected: number): number {
	return expected === 0 ? Math.abs(actual) : Math.abs(actual - expected) / Math.abs(expected);
}

function mulberry32(seed: number): () => number {
	let state = seed >>> 0;
	return () => {
		state = (state + 0x6d2b79f5) >>> 0;
		let t = state;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

function run(input: Record<string, unknown>): { outputs: BondForceOutput; warnings: string[] } {
	const result = runCalculator('bond-force', input);
	if (!result.ok) throw new Error(`${result.error} ${JSON.stringify(result.fields)}`);
	return result;
}

function fieldsOf(input: Record<string, unknown>): Record<string, string> {
	const result = runCalculator('bond-force', input);
	expect(result.ok).toBe(false);
	return result.ok ? {} : result.fields;
}

const cog = { basis: 'bump', bumpCount: 1200, bumpWidthUm: 20, bumpLengthUm: 100 };

describe('bond-force: published and hand-computed values', () => {
	it('gives 78.4532 MPa for 800 kgf on 1 cm² of bump area', () => {
		// Jeng & Hsieh (2001), IEEE Trans. Compon. Packag. Technol. 24(2): 800 kgf/cm² = 78.4532 MPa.
		// 1000 bumps of 100 µm × 1000 µm make exactly 1 cm² = 100 mm²; 800 kgf = 7845.32 N (NIST SP 811).
		const { outputs } = run({
			basis: 'bump',
			bumpCount: 1000,
			bumpWidthUm: 100,
			bumpLengthUm: 1000,
			forceN: 800 * 9.80665
		});
		expect(relativeError(outputs.areaMm2, 100)).toBeLessThan(1e-15);
		expect(relativeError(outputs.pressureMPa, 78.4532)).toBeLessThan(1e-14);
		expect(relativeError(outputs.forceKgf, 800)).toBeLessThan(1e-14);
	});

	it('uses the total bump area on the bump basis', () => {
		// 1200 × 20 µm × 100 µm = 2.4 mm², by hand (common practice, no source)
		const { outputs } = run({ ...cog, pressureMPa: 80 });
		expect(relativeError(outputs.areaMm2, 2.4)).toBeLessThan(1e-14);
		// 80 MPa × 2.4 mm² = 192 N, and 192 N / 1200 bumps = 0.16 N = 160 mN, by hand
		expect(relativeError(outputs.forceN, 192)).toBeLessThan(1e-14);
		expect(relativeError(outputs.forcePerBumpMN as number, 160)).toBeLessThan(1e-14);
		// 192 N / 9.80665 N per kgf (NIST SP 811, exact factor)
		expect(relativeError(outputs.forceKgf, 192 / 9.80665)).toBeLessThan(1e-14);
	});

	it('uses width × length on the tool basis and reports no per-bump force', () => {
		// 1.5 mm × 30 mm = 45 mm² at 3 MPa = 135 N, by hand (common practice, no source)
		const { outputs, warnings } = run({
			basis: 'tool',
			widthMm: 1.5,
			lengthMm: 30,
			pressureMPa: 3
		});
		expect(relativeError(outputs.areaMm2, 45)).toBeLessThan(1e-14);
		expect(relativeError(outputs.forceN, 135)).toBeLessThan(1e-14);
		expect(outputs.forcePerBumpMN).toBeUndefined();
		expect(warnings).toEqual([]);
	});

	it('gives the cylinder gauge pressure from the bore and head weight', () => {
		// (500 N − 50 N) / (π · 40² / 4 mm²): the formula in CALCULATIONS.md, evaluated by hand as
		// 450 / (400 π) = 0.35809862 MPa = 3.5809862 bar (1 bar = 0.1 MPa, NIST SP 811)
		const { outputs } = run({
			basis: 'tool',
			widthMm: 2,
			lengthMm: 50,
			forceN: 500,
			cylinderBoreMm: 40,
			headWeightN: 50
		});
		expect(outputs.cylinderGaugeMPa).toBeCloseTo(0.35809862, 8);
		expect(outputs.cylinderGaugeBar).toBeCloseTo(3.5809862, 7);
	});

	it('warns when the head weight exceeds the force', () => {
		// 20 N of force with a 50 N head: the cylinder would have to pull (common practice, no source)
		const { outputs, warnings } = run({
			basis: 'tool',
			widthMm: 2,
			lengthMm: 5,
			forceN: 20,
			cylinderBoreMm: 20,
			headWeightN: 50
		});
		expect(outputs.cylinderGaugeMPa).toBeLessThan(0);
		expect(warnings.join(' ')).toMatch(/head weight alone exceeds/);
	});

	it('warns when a pressure looks quoted on the wrong basis', () => {
		// COG tens of MPa on bump area, FOG a few MPa on tool area (CALCULATIONS.md, common practice)
		expect(run({ ...cog, pressureMPa: 3 }).warnings.join(' ')).toMatch(/bump area/);
		expect(
			run({ basis: 'tool', widthMm: 1.5, lengthMm: 30, pressureMPa: 80 }).warnings.join(' ')
		).toMatch(/bonded area/);
	});
});

describe('bond-force: properties', () => {
	it('scales force linearly with pressure and inverts back to the pressure', () => {
		const random = mulberry32(42);
		const bases = ['bump', 'tool', 'acf', 'lead'] as const;
		for (let trial = 0; trial < 200; trial++) {
			const basis = bases[Math.floor(random() * bases.length)];
			const geometry =
				basis === 'bump'
					? {
							bumpCount: 1 + Math.floor(random() * 3000),
							bumpWidthUm: 5 + random() * 100,
							bumpLengthUm: 20 + random() * 200
						}
					: { widthMm: 0.5 + random() * 5, lengthMm: 5 + random() * 100 };
			const pressureMPa = 0.5 + random() * 100;
			const scale = 1 + random() * 4;
			const input = { basis, ...geometry };
			const base = computeBondForce(bondForceSchema.parse({ ...input, pressureMPa })).outputs;
			const scaled = computeBondForce(
				bondForceSchema.parse({ ...input, pressureMPa: pressureMPa * scale })
			).outputs;
			expect(relativeError(scaled.forceN, base.forceN * scale)).toBeLessThan(1e-13);
			expect(relativeError(scaled.areaMm2, base.areaMm2)).toBe(0);
			const back = computeBondForce(
				bondForceSchema.parse({ ...input, forceN: base.forceN })
			).outputs;
			expect(relativeError(back.pressureMPa, pressureMPa)).toBeLessThan(1e-13);
		}
	});
});

describe('bond-force: validation', () => {
	it('refuses a pressure without an area basis', () => {
		const fields = fieldsOf({ pressureMPa: 80, widthMm: 1, lengthMm: 10 });
		expect(fields.basis).toMatch(/area basis/);
	});

	it('refuses both and neither of pressure and force', () => {
		const both = fieldsOf({ ...cog, pressureMPa: 80, forceN: 100 });
		expect(both.pressureMPa).toMatch(/not both/);
		expect(both.forceN).toMatch(/not both/);
		const neither = fieldsOf({ ...cog });
		expect(neither.pressureMPa).toMatch(/Enter a pressure or a force/);
		expect(neither.forceN).toMatch(/Enter a pressure or a force/);
	});

	it('refuses negative and zero areas', () => {
		const fields = fieldsOf({ basis: 'tool', widthMm: -1, lengthMm: 0, pressureMPa: 3 });
		expect(fields.widthMm).toBe('Width must be greater than 0 mm');
		expect(fields.lengthMm).toBe('Length must be greater than 0 mm');
		const bumps = fieldsOf({ ...cog, bumpWidthUm: 0, bumpCount: 12.5, pressureMPa: 80 });
		expect(bumps.bumpWidthUm).toMatch(/greater than 0/);
		expect(bumps.bumpCount).toMatch(/whole number/);
	});

	it('asks for the dimensions that belong to the basis', () => {
		const bump = fieldsOf({ basis: 'bump', widthMm: 1, lengthMm: 10, pressureMPa: 80 });
		expect(Object.keys(bump).sort()).toEqual(['bumpCount', 'bumpLengthUm', 'bumpWidthUm']);
		const tool = fieldsOf({ ...cog, basis: 'lead', pressureMPa: 3 });
		expect(Object.keys(tool).sort()).toEqual(['lengthMm', 'widthMm']);
	});

	it('refuses an unknown basis, negative head weight and a non-numeric pressure', () => {
		const fields = fieldsOf({ basis: 'chip', pressureMPa: 'high', headWeightN: -5 });
		expect(fields.basis).toMatch(/one of: bump, tool, acf, lead/);
		expect(fields.pressureMPa).toMatch(/must be a number/);
		expect(fields.headWeightN).toMatch(/between 0 and 10000 N/);
	});

	it('accepts numeric strings from forms', () => {
		const fromStrings = run({
			basis: 'bump',
			bumpCount: '1200',
			bumpWidthUm: ' 20 ',
			bumpLengthUm: '1e2',
			pressureMPa: '80',
			forceN: ''
		}).outputs;
		const fromNumbers = run({ ...cog, pressureMPa: 80 }).outputs;
		expect(fromStrings).toEqual(fromNumbers);
	});
});
