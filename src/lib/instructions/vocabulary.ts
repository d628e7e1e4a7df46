// Controlled vocabularies of the Instructions area, shared by schema, server and pages.

/** Stored revision states. 'superseded' may be persisted by a job; reading derives it anyway. */
export const REVISION_STATES = ['draft', 'in_review', 'approved', 'superseded'] as const;
export type RevisionState = (typeof REVISION_STATES)[number];

/** What a change asks of the people who work to the instruction. */
export const CHANGE_CLASSES = ['editorial', 'acknowledge', 'retraining'] as const;
export type ChangeClass = (typeof CHANGE_CLASSES)[number];

export const CHANGE_CLASS_LABELS: Record<ChangeClass, string> = {
	editorial: 'Editorial (no action for operators)',
	acknowledge: 'Needs acknowledgement (read and confirm)',
	retraining: 'Needs retraining (new knowledge check / sign-off)'
};

/** The meanings a signer may choose (controlled list). */
export const SIGNATURE_MEANINGS = ['reviewed', 'approved'] as const;
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];

/** Every meaning the signatures table holds: revision meanings plus the practical sign-off's. */
export const STORED_SIGNATURE_MEANINGS = [
	...SIGNATURE_MEANINGS,
	'observed',
	'countersigned'
] as const;
export type StoredSignatureMeaning = (typeof STORED_SIGNATURE_MEANINGS)[number];

export const SIGNATURE_MEANING_LABELS: Record<SignatureMeaning, string> = {
	reviewed: 'Reviewed — I have checked this revision',
	approved: 'Approved — this revision may be put in force'
};

export const FILE_KINDS = ['image', 'attachment'] as const;
export type FileKind = (typeof FILE_KINDS)[number];

/** The state a person sees: stored state plus what the clock says. */
export type DisplayStatus = 'draft' | 'in_review' | 'scheduled' | 'effective' | 'superseded';

export const STATUS_LABELS: Record<DisplayStatus, string> = {
	draft: 'Draft',
	in_review: 'In review',
	scheduled: 'Approved',
	effective: 'Effective',
	superseded: 'Superseded'
};

export const STATUS_TONES: Record<
	DisplayStatus,
	'neutral' | 'info' | 'warn' | 'valid' | 'superseded'
> = {
	draft: 'neutral',
	in_review: 'info',
	scheduled: 'warn',
	effective: 'valid',
	superseded: 'superseded'
};

/** Document numbers like WI-COG-004: a prefix and one to three dash-separated parts. */
export const DOC_NUMBER_RE = /^[A-Z][A-Z0-9]{1,5}(?:-[A-Z0-9]{1,8}){1,3}$/;
/** Revision letters A … Z, then AA … ZZ. */
export const REVISION_LETTER_RE = /^[A-Z]{1,2}$/;

/** The letter after `letter` (A → B, Z → AA, AZ → BA). */
export function nextRevisionLetter(letter: string | null): string {
	if (!letter) return 'A';
	const n = letterToNumber(letter) + 1;
	return numberToLetter(n);
}

export function letterToNumber(letter: string): number {
	let n = 0;
	for (const c of letter) n = n * 26 + (c.charCodeAt(0) - 64);
	return n;
}

function numberToLetter(n: number): string {
	let s = '';
	while (n > 0) {
		const r = (n - 1) % 26;
		s = String.fromCharCode(65 + r) + s;
		n = Math.floor((n - 1) / 26);
	}
	return s;
}
