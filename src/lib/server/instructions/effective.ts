// The one rule for "which revision is in force", evaluated at read time with an injectable clock,
// so it is exact at the boundary without any job. Pages, API, search and station pages all use it.
import type { DisplayStatus, RevisionState } from '../../instructions/vocabulary';

export interface TimedRevision {
	id: number;
	state: RevisionState;
	effectiveFrom: Date | null;
}

/** True for revisions that have been approved (a job may have stored them as 'superseded'). */
export const isApprovedState = (state: RevisionState) =>
	state === 'approved' || state === 'superseded';

/**
 * The effective revision at instant `now`: the approved revision with the greatest effectiveFrom
 * ≤ now (ties go to the later revision); none while or after the instruction is withdrawn.
 */
export function pickEffective<T extends TimedRevision>(
	revisions: readonly T[],
	now: Date = new Date(),
	withdrawnAt: Date | null = null
): T | null {
	const t = now.getTime();
	if (withdrawnAt && withdrawnAt.getTime() <= t) return null;
	let best: T | null = null;
	for (const r of revisions) {
		if (!isApprovedState(r.state) || !r.effectiveFrom) continue;
		const from = r.effectiveFrom.getTime();
		if (from > t) continue;
		const bestFrom = best?.effectiveFrom?.getTime() ?? -Infinity;
		if (!best || from > bestFrom || (from === bestFrom && r.id > best.id)) best = r;
	}
	return best;
}

/** What a person is shown for a revision at `now`, given the instruction's effective revision. */
export function displayStatus(
	revision: TimedRevision,
	effectiveId: number | null,
	now: Date = new Date()
): DisplayStatus {
	if (revision.state === 'draft') return 'draft';
	if (revision.state === 'in_review') return 'in_review';
	if (revision.id === effectiveId) return 'effective';
	if (revision.effectiveFrom && revision.effectiveFrom.getTime() > now.getTime())
		return 'scheduled';
	return 'superseded';
}

/** The next instant after `now` at which some approved revision becomes effective, if any. */
export function nextSwitchAfter(revisions: readonly TimedRevision[], now: Date): Date | null {
	let next: number | null = null;
	for (const r of revisions) {
		if (!isApprovedState(r.state) || !r.effectiveFrom) continue;
		const from = r.effectiveFrom.getTime();
		if (from > now.getTime() && (next === null || from < next)) next = from;
	}
	return next === null ? null : new Date(next);
}
