import { readinessResponse } from '$lib/server/readiness/http';
import type { RequestHandler } from './$types';

/** The Readiness board as CSV (UTF-8 with BOM, formula-safe). */
export const GET: RequestHandler = (event) => readinessResponse(event, true);
