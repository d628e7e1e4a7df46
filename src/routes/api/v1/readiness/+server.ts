import { readinessResponse } from '$lib/server/readiness/http';
import type { RequestHandler } from './$types';

/** The Readiness board as JSON (`?format=csv` for the CSV export). */
export const GET: RequestHandler = (event) => readinessResponse(event);
