// Fault points for the resilience tests. A multi-row write calls `faultPoint(name)` inside its
// transaction right after its first statement that writes (each of these transactions opens with a
// locking read, and a pause after a bare read would leave nothing half-done to roll back), so the
// database holds part of the change, uncommitted, while the rest is still to come. When the process
// runs with PADBRIDGE_FAULT_POINTS=1 and a test has armed that point, the write pauses there until
// the test releases it (after killing the database, say). Without the variable, or with nothing
// armed, a fault point costs one property read.

export const FAULT_POINTS = [
	'publish-revision',
	'issue-certificate',
	'submit-attempt',
	'grant-supervised-run',
	'retention-run'
] as const;
export type FaultPointName = (typeof FAULT_POINTS)[number];

interface Armed {
	reached: () => void;
	release: Promise<void>;
}

const armed = new Map<FaultPointName, Armed>();
const enabled = () => process.env.PADBRIDGE_FAULT_POINTS === '1';

/** Pauses here if a test armed this point; otherwise returns at once. */
export async function faultPoint(name: FaultPointName): Promise<void> {
	if (!enabled()) return;
	const a = armed.get(name);
	if (!a) return;
	armed.delete(name);
	a.reached();
	await a.release;
}

/**
 * Arms a point once: `reached` resolves when a write arrives there, and the write waits until
 * `release()` is called. Refuses unless fault points are enabled, so production code cannot arm one.
 */
export function armFaultPoint(name: FaultPointName): {
	reached: Promise<void>;
	release: () => void;
} {
	if (!enabled()) throw new Error('fault points are off (PADBRIDGE_FAULT_POINTS=1 turns them on)');
	let reached!: () => void;
	let release!: () => void;
	const reachedP = new Promise<void>((r) => (reached = r));
	const releaseP = new Promise<void>((r) => (release = r));
	armed.set(name, { reached, release: releaseP });
	return { reached: reachedP, release };
}

/** Forgets every armed point (a test's clean-up, so a point armed by a failed test cannot linger). */
export function disarmFaultPoints(): void {
	armed.clear();
}
