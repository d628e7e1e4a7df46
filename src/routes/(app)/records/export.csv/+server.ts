import { recordsExportResponse } from '$lib/server/records/http';
import type { RequestHandler } from './$types';

/** Training records as CSV (UTF-8 with BOM, RFC 4180, formula-safe), streamed. */
export const GET: RequestHandler = (event) => recordsExportResponse(event, 'csv');
