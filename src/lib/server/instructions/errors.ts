import { Refusal } from '../errors';

export { isDuplicateKey } from '../errors';

/** A refusal from the Instructions area (see Refusal). */
export class InstructionError extends Refusal {}

export const notFound = (what = 'No such instruction or revision') =>
	new InstructionError(404, what);
