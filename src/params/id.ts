import type { ParamMatcher } from '@sveltejs/kit';

/** Positive integer ids only, so malformed URLs 404 before any load runs. */
export const match: ParamMatcher = (param) => /^[1-9][0-9]{0,15}$/.test(param);
