import type { ParamMatcher } from '@sveltejs/kit';
import { CHECK_CODE_RE } from '../lib/schemas/checks';

/** Knowledge-check codes like KC-COG-MB. */
export const match: ParamMatcher = (param) => CHECK_CODE_RE.test(param);
