import type { ParamMatcher } from '@sveltejs/kit';

/** Station codes like L2-FOG-03. */
export const match: ParamMatcher = (param) => /^[A-Z0-9]{1,6}(?:-[A-Z0-9]{1,8}){1,3}$/.test(param);
