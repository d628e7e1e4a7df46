// Kept apart from the registry so that route matchers can check an id without loading every
// calculator's code.
export const calculatorIds = [
	'bond-force',
	'particle-capture',
	'bridge-risk',
	'cure-degree',
	'pitch-compensation',
	'head-offset',
	'units'
] as const;

export type CalculatorId = (typeof calculatorIds)[number];

export function isCalculatorId(value: unknown): value is CalculatorId {
	return typeof value === 'string' && (calculatorIds as readonly string[]).includes(value);
}
