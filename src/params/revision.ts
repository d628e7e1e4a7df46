import type { ParamMatcher } from '@sveltejs/kit';
import { REVISION_LETTER_RE } from '../lib/instructions/vocabulary';

/** Revision letters A … ZZ. */
export const match: ParamMatcher = (param) => REVISION_LETTER_RE.test(param);
