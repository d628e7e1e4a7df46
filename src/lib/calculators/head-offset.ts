import { z } from 'zod';
import {
	listSchema,
	numberSchema,
	optionalNumberSchema,
	type CalculatorResult,
	type ListInputDef,
	type NumberInputDef
} from './fields';

const pointFields = [
	{
		kind: 'number',
		name: 'setpointC',
		label: 'Set-point',
		unit: '°C',
		min: -50,
		max: 500,
		step: 1,
		help: 'Head temperature set on the bonder.'
	},
	{
		kind: 'number',
		name: 'measuredC',
		label: 'Measured',
		unit: '°C',
		min: -50,
		max: 500,
		step: 0.1,
		help: 'Peak temperature read by the thermocouple in the ACF at that set-point.'
	}
] as const satisfies readonly NumberInputDef[];

const temperature = (name: string, label: string, help: string, defaultC: number) =>
	({
		kind: 'number',
		name,
		label,
		unit: '°C',
		default: defaultC,
		min: -50,
		max: 500,
		step: 0.1,
		optional: true,
		help
	}) satisfies NumberInputDef;

// The default calibration points are illustrative, not from any bonder.
export const headOffsetInputs = {
	points: {
		kind: 'list',
		name: 'points',
		label: 'Calibration points',
		unit: '',
		itemLabel: 'calibration point',
		itemFields: pointFields,
		minItems: 2,
		maxItems: 100,
		default: [
			{ setpointC: 200, measuredC: 167.5 },
			{ setpointC: 220, measuredC: 183.8 },
			{ setpointC: 240, measuredC: 200.6 },
			{ setpointC: 260, measuredC: 216.9 }
		],
		requiredMessage: 'Add at least two calibration points',
		help: 'Head set-points and the bond-line temperatures measured with a thermocouple in the ACF.'
	},
	targetC: {
		kind: 'number',
		name: 'targetC',
		label: 'Target bond-line temperature',
		unit: '°C',
		default: 185,
		min: -50,
		max: 500,
		step: 0.1,
		help: "The ACF temperature the recipe asks for, from the ACF maker's data sheet."
	},
	tauS: {
		kind: 'number',
		name: 'tauS',
		label: 'Time constant',
		unit: 's',
		default: 1.5,
		min: 0,
		minExclusive: true,
		max: 1000,
		step: 0.1,
		optional: true,
		help: 'First-order lag of the bond line behind the head; give all four lag inputs or none.'
	},
	startC: temperature(
		'startC',
		'Start temperature',
		'Bond-line temperature when the head lands (a lag input).',
		25
	),
	steadyC: temperature(
		'steadyC',
		'Steady temperature',
		'Bond-line temperature the lag settles at (a lag input).',
		185
	),
	reachC: temperature(
		'reachC',
		'Reach temperature',
		'The temperature whose arrival time is wanted, between start and steady (a lag input).',
		180
	)
} satisfies Record<string, NumberInputDef | ListInputDef>;

const i = headOffsetInputs;
const lagKeys = ['tauS', 'startC', 'steadyC', 'reachC'] as const;

export const headOffsetSchema = z
	.object({
		points: listSchema(i.points),
		targetC: numberSchema(i.targetC),
		tauS: optionalNumberSchema(i.tauS),
		startC: optionalNumberSchema(i.startC),
		steadyC: optionalNumberSchema(i.steadyC),
		reachC: optionalNumberSchema(i.reachC)
	})
	.superRefine((input, ctx) => {
		const setpoints = new Set(input.points.map((point) => point.setpointC));
		if (setpoints.size < 2) {
			ctx.addIssue({
				code: 'custom',
				path: ['points'],
				message: 'Calibrate at least two different set-points; equal set-points give no slope'
			});
		} else if (new Set(input.points.map((point) => point.measuredC)).size < 2) {
			ctx.addIssue({
				code: 'custom',
				path: ['points'],
				message:
					'The measured temperature does not change with the set-point, so no set-point can reach the target'
			});
		}
		const given = lagKeys.filter((key) => input[key] !== undefined);
		if (given.length > 0 && given.length < lagKeys.length) {
			for (const key of lagKeys) {
				if (input[key] === undefined) {
					ctx.addIssue({
						code: 'custom',
						path: [key],
						message: `${i[key].label} is needed with the other lag inputs (or leave all four empty)`
					});
				}
			}
			return;
		}
		if (given.length === 0) return;
		const { startC, steadyC, reachC } = input as Required<typeof input>;
		if (steadyC === startC) {
			ctx.addIssue({
				code: 'custom',
				path: ['steadyC'],
				message: 'Steady temperature must differ from the start temperature'
			});
			return;
		}
		const fraction = (reachC - startC) / (steadyC - startC);
		if (!(fraction >= 0 && fraction < 1)) {
			ctx.addIssue({
				code: 'custom',
				path: ['reachC'],
				message:
					'Reach temperature must lie between the start and steady temperatures (a first-order lag never reaches the steady value)'
			});
		}
	});

export type HeadOffsetInput = z.output<typeof headOffsetSchema>;

export interface HeadOffsetOutput {
	slope: number;
	interceptC: number;
	requiredSetpointC: number;
	rSquared: number;
	timeToReachS?: number;
}

export interface LineFit {
	slope: number;
	intercept: number;
	rSquared: number;
}

/** Ordinary least squares y = intercept + slope · x, on centred data to keep digits. */
export function fitLine(xs: readonly number[], ys: readonly number[]): LineFit {
	const count = xs.length;
	const meanX = xs.reduce((sum, x) => sum + x, 0) / count;
	const meanY = ys.reduce((sum, y) => sum + y, 0) / count;
	let sxx = 0;
	let sxy = 0;
	let syy = 0;
	for (let j = 0; j < count; j++) {
		const dx = xs[j] - meanX;
		const dy = ys[j] - meanY;
		sxx += dx * dx;
		sxy += dx * dy;
		syy += dy * dy;
	}
	const slope = sxy / sxx;
	const intercept = meanY - slope * meanX;
	let residual = 0;
	for (let j = 0; j < count; j++) {
		const r = ys[j] - (intercept + slope * xs[j]);
		residual += r * r;
	}
	return { slope, intercept, rSquared: syy === 0 ? 1 : Math.max(0, 1 - residual / syy) };
}

/** Time for a first-order lag with time constant τ to climb from start to reach toward steady. */
export function lagTimeS(tauS: number, startC: number, steadyC: number, reachC: number): number {
	return -tauS * Math.log1p(-(reachC - startC) / (steadyC - startC));
}

// Common practice, no source: a thermocouple calibration that scatters more than this needs a look.
const R_SQUARED_WARNING = 0.99;

export function computeHeadOffset(input: HeadOffsetInput): CalculatorResult<HeadOffsetOutput> {
	const warnings: string[] = [];
	const setpoints = input.points.map((point) => point.setpointC);
	const fit = fitLine(
		setpoints,
		input.points.map((point) => point.measuredC)
	);
	const requiredSetpointC = (input.targetC - fit.intercept) / fit.slope;
	const outputs: HeadOffsetOutput = {
		slope: fit.slope,
		interceptC: fit.intercept,
		requiredSetpointC,
		rSquared: fit.rSquared
	};
	if (
		input.tauS !== undefined &&
		input.startC !== undefined &&
		input.steadyC !== undefined &&
		input.reachC !== undefined
	) {
		outputs.timeToReachS = lagTimeS(input.tauS, input.startC, input.steadyC, input.reachC);
	}
	if (fit.slope <= 0) {
		warnings.push(
			'The measured temperature falls as the set-point rises; check the calibration data.'
		);
	}
	if (fit.rSquared < R_SQUARED_WARNING) {
		warnings.push(
			`The points scatter about the fitted line (R² = ${fit.rSquared.toFixed(3)}); check the thermocouple placement and repeat the calibration.`
		);
	}
	const lowC = Math.min(...setpoints);
	const highC = Math.max(...setpoints);
	if (requiredSetpointC < lowC || requiredSetpointC > highC) {
		warnings.push(
			`The required set-point lies outside the calibrated ${lowC}–${highC} °C; calibrate around it before use.`
		);
	}
	return { outputs, warnings };
}
