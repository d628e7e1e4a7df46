import { recordsExportResponse } from '$lib/server/records/http';
import type { RequestHandler } from './$types';

/** Training records as XLSX (typed cells, frozen header, autofilter), streamed. */
export const GET: RequestHandler = (event) => recordsExportResponse(event, 'xlsx');
