// GET /api/v1/readiness and /api/v1/readiness.csv share this: guard, validate, resolve the codes
// within the viewer's reach (a line outside it answers 404 like an unknown one), build, answer.
import { json, type RequestEvent } from '@sveltejs/kit';
import { requireApiRole } from '../auth/guards';
import { fieldErrors } from '../api';
import { actorFrom, recordAuditNow } from '../audit';
import { reachableLines } from '../training/assignments';
import { readinessQueryInput, readinessQuerySchema } from '../../schemas/readiness';
import { localDate } from '../../time';
import { readinessBoard, resolveCodes } from './index';
import { readinessCsv } from './csv';

export const READINESS_ROLES = ['lead', 'quality', 'admin'] as const;

export async function readinessResponse(event: RequestEvent, csv = false): Promise<Response> {
	const user = requireApiRole(event, ...READINESS_ROLES);
	const parsed = readinessQuerySchema.safeParse(readinessQueryInput(event.url.searchParams));
	if (!parsed.success) {
		const fields = fieldErrors(parsed.error);
		return json({ error: Object.values(fields)[0], fields }, { status: 400 });
	}
	const q = parsed.data;
	const lines = await reachableLines(user);
	const line = q.line ? lines.find((l) => l.code === q.line) : lines[0];
	if (!line) {
		const text = q.line ? `No line ${q.line}.` : 'No line in your reach.';
		return json({ error: text }, { status: 404 });
	}
	const codes = await resolveCodes(line.id, q.shift ?? null, q.process);
	const fields: Record<string, string> = {};
	if (q.shift && !codes.shiftId) fields.shift = `No shift ${q.shift} at this plant.`;
	if (codes.unknownProcesses.length)
		fields.process = `No process ${codes.unknownProcesses.join(', ')}.`;
	if (Object.keys(fields).length)
		return json({ error: Object.values(fields)[0], fields }, { status: 400 });

	const now = new Date();
	const board = await readinessBoard({
		lineId: line.id,
		shiftId: codes.shiftId,
		processIds: codes.processIds,
		agencyOnly: q.agency,
		now
	});
	if (!board) return json({ error: `No line ${q.line}.` }, { status: 404 });
	if (!csv && q.format !== 'csv') return json(board);

	await recordAuditNow(actorFrom(event), {
		action: 'readiness.export',
		entityType: 'readiness_board',
		entityId: String(line.id),
		newValues: {
			format: 'csv',
			line: line.code,
			shift: q.shift ?? null,
			process: q.process,
			agency: q.agency,
			rows: board.people.length
		}
	});
	const name = `readiness-${line.code}${q.shift ? `-${q.shift}` : ''}-${localDate(now, board.timeZone)}.csv`;
	return new Response(readinessCsv(board), {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="${name}"`
		}
	});
}
