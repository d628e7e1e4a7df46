import type { ParamMatcher } from '@sveltejs/kit';
import { isCalculatorId } from '$lib/calculators/ids';

/** Only the ids of the calculator registry, so an unknown calculator 404s before any load. */
export const match: ParamMatcher = (param) => isCalculatorId(param);
