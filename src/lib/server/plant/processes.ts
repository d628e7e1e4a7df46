import { asc, count, eq } from 'drizzle-orm';
import { db } from '../db';
import { processes, stationProcesses } from '../db/schema';
import type { Actor } from '../audit';
import type { ProcessInput } from '../../schemas/plant';
import { createAudited, updateAudited } from './common';

/** The columns of a process every screen shows. */
export const processFields = {
	id: processes.id,
	code: processes.code,
	name: processes.name,
	bondType: processes.bondType,
	active: processes.active
};

/** Every process with how many stations require it (processes are shared by all sites). */
export async function listProcesses() {
	const rows = await db
		.select({
			...processFields,
			stationCount: count(stationProcesses.stationId)
		})
		.from(processes)
		.leftJoin(stationProcesses, eq(stationProcesses.processId, processes.id))
		.groupBy(processes.id)
		.orderBy(asc(processes.code));
	return rows.map((r) => ({ ...r, stationCount: Number(r.stationCount) }));
}

export async function getProcess(id: number) {
	const [row] = await db.select(processFields).from(processes).where(eq(processes.id, id));
	return row ?? null;
}

const taken = (code: string) => `Process ${code} already exists`;
const fields = (i: ProcessInput) => ({ code: i.code, name: i.name, bondType: i.bondType });

export async function createProcess(actor: Actor, input: ProcessInput) {
	return createAudited(actor, 'process', fields(input), taken(input.code));
}

export async function updateProcess(actor: Actor, id: number, input: ProcessInput) {
	return updateAudited(actor, 'process', id, fields(input), taken(input.code));
}
