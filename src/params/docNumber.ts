import type { ParamMatcher } from '@sveltejs/kit';
import { DOC_NUMBER_RE } from '../lib/instructions/vocabulary';

/** Document numbers like WI-COG-004, so malformed URLs 404 before any load runs. */
export const match: ParamMatcher = (param) => DOC_NUMBER_RE.test(param);
