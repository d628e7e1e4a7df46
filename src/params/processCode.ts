import type { ParamMatcher } from '@sveltejs/kit';

/** Process codes like COG-MB or ESD-BASIC, so malformed URLs 404 before any load runs. */
export const match: ParamMatcher = (param) =>
	param.length <= 32 && /^[A-Z0-9]+(-[A-Z0-9]+)*$/.test(param);
