// STAND-IN until the lead's certificates/issue.ts lands on main; on merge, main's file wins.
// It issues nothing: the sign-off code calls it after a countersign, exactly as it will call the
// real one.
import type { Actor } from '../audit';

export async function evaluateAndIssue(
	_personId: number,
	_processId: number,
	_opts: { now?: Date; actor?: Actor } = {}
): Promise<null> {
	return null;
}

/** The PDF's object key, made on demand when missing; the stand-in cannot make one. */
export async function ensureCertificatePdf(_id: number): Promise<string | null> {
	return null;
}
