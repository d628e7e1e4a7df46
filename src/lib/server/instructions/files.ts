// Images and attachments of a draft revision: type checked by content, size-limited, images
// re-encoded (which drops EXIF/GPS) with a pixel-flood guard, stored in S3 under random keys.
import { randomUUID, createHash } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { db } from '../db';
import { revisionFiles, revisions } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { deleteObject, putObject } from '../storage';
import { InstructionError, isDuplicateKey, notFound } from './errors';
import { computeContentHash } from './hash';
import { listRevisionFiles } from './queries';
import { IMAGE_LIMIT_BYTES, PDF_LIMIT_BYTES } from '../../upload-limits';

/** Decoded pixels allowed per image (a 40-megapixel photo), against decompression bombs. */
export const IMAGE_PIXEL_LIMIT = 40_000_000;

const ALLOWED: Record<string, { kind: 'image' | 'attachment'; ext: string; limit: number }> = {
	'image/jpeg': { kind: 'image', ext: 'jpg', limit: IMAGE_LIMIT_BYTES },
	'image/png': { kind: 'image', ext: 'png', limit: IMAGE_LIMIT_BYTES },
	'image/webp': { kind: 'image', ext: 'webp', limit: IMAGE_LIMIT_BYTES },
	'application/pdf': { kind: 'attachment', ext: 'pdf', limit: PDF_LIMIT_BYTES }
};

const mb = (n: number) => `${Math.round(n / 1024 / 1024)} MB`;

/**
 * The name to keep: path parts removed, control and odd characters replaced, length capped,
 * and the extension set from the detected type.
 */
export function cleanFileName(name: string, ext: string): string {
	const base = name.split(/[\\/]/).pop() ?? '';
	const stem = base
		.normalize('NFC')
		.replace(/\.[^.]*$/, '')
		// eslint-disable-next-line no-control-regex -- control characters are what is removed
		.replace(/[\u0000-\u001f\u007f-\u009f\u200b-\u200f\u202a-\u202e\u2066-\u2069]/g, '')
		.replace(/[^\p{L}\p{N} ._-]+/gu, '-')
		.replace(/^[.\s-]+/, '')
		.replace(/\s+/g, '-')
		.slice(0, 100);
	return `${stem || 'file'}.${ext}`;
}

function looksLikeSvgOrHtml(bytes: Uint8Array, name: string) {
	const head = new TextDecoder('utf-8', { fatal: false })
		.decode(bytes.subarray(0, 512))
		.trimStart()
		.toLowerCase();
	return (
		/\.svgz?$/i.test(name) ||
		head.startsWith('<svg') ||
		(head.startsWith('<?xml') && head.includes('<svg'))
	);
}

export interface CheckedUpload {
	stored: Uint8Array;
	mime: string;
	ext: string;
	kind: 'image' | 'attachment';
	widthPx: number | null;
	heightPx: number | null;
	sha256: string;
}

/**
 * Checks an upload by its content (type sniffed, SVG refused, size limit, pixel-flood guard) and
 * re-encodes images, which drops EXIF/GPS. `imagesOnly` refuses PDFs (sign-off photos).
 */
export async function checkUpload(
	upload: { name: string; bytes: Uint8Array },
	imagesOnly = false
): Promise<CheckedUpload> {
	const { bytes } = upload;
	if (bytes.byteLength === 0)
		throw new InstructionError(400, 'The file is empty (0 bytes). Choose the file again.', {
			file: 'Empty file.'
		});
	if (looksLikeSvgOrHtml(bytes, upload.name))
		throw new InstructionError(
			415,
			'SVG drawings are not accepted because they can carry scripts. Export the drawing as PNG and upload that.',
			{ file: 'SVG refused.' }
		);
	const detected = await fileTypeFromBuffer(bytes);
	const found = detected ? ALLOWED[detected.mime] : undefined;
	const type = imagesOnly && found?.kind !== 'image' ? undefined : found;
	if (!detected || !type)
		throw new InstructionError(
			415,
			`Only JPEG, PNG or WebP images${imagesOnly ? '' : ' and PDF files'} are accepted. By its content this file is ${detected ? detected.mime : 'not a recognised image or PDF'}, whatever its name says.`,
			{ file: 'Type not allowed.' }
		);
	if (bytes.byteLength > type.limit)
		throw new InstructionError(
			413,
			`The file is ${(bytes.byteLength / 1024 / 1024).toFixed(1)} MB; ${type.kind === 'image' ? 'images' : 'PDF files'} may be at most ${mb(type.limit)}.`,
			{ file: 'Too large.' }
		);

	let stored: Uint8Array = bytes;
	let widthPx: number | null = null;
	let heightPx: number | null = null;
	if (type.kind === 'image') {
		try {
			// Re-encoding without withMetadata() drops EXIF, GPS and any trailing payload.
			const img = sharp(bytes, { limitInputPixels: IMAGE_PIXEL_LIMIT, failOn: 'error' }).rotate();
			const out =
				detected.mime === 'image/png'
					? img.png({ compressionLevel: 9 })
					: detected.mime === 'image/webp'
						? img.webp({ quality: 85 })
						: img.jpeg({ quality: 85, mozjpeg: true });
			const { data, info } = await out.toBuffer({ resolveWithObject: true });
			stored = new Uint8Array(data);
			widthPx = info.width;
			heightPx = info.height;
		} catch (err) {
			const msg = err instanceof Error ? err.message : '';
			if (/pixel limit/i.test(msg))
				throw new InstructionError(
					413,
					`The image has more than ${IMAGE_PIXEL_LIMIT / 1_000_000} megapixels. Scale it down and upload again.`,
					{ file: 'Too many pixels.' }
				);
			throw new InstructionError(422, 'The image could not be read; it may be damaged.', {
				file: 'Unreadable image.'
			});
		}
	}
	const sha256 = createHash('sha256').update(stored).digest('hex');
	return {
		stored,
		mime: detected.mime,
		ext: type.ext,
		kind: type.kind,
		widthPx,
		heightPx,
		sha256
	};
}

/** Checks, cleans and stores one uploaded file in a draft revision. */
export async function addRevisionFile(
	actor: Actor & { id: number },
	revisionId: number,
	upload: { name: string; bytes: Uint8Array }
) {
	const [rev] = await db
		.select({ state: revisions.state, letter: revisions.letter })
		.from(revisions)
		.where(eq(revisions.id, revisionId));
	if (!rev) throw notFound();
	if (rev.state !== 'draft')
		throw new InstructionError(
			409,
			'Files are frozen: they can change only while the revision is a draft.'
		);
	const checked = await checkUpload(upload);
	const { stored, widthPx, heightPx, sha256 } = checked;
	const originalName = cleanFileName(upload.name, checked.ext);
	const storageKey = `revisions/${revisionId}/${randomUUID()}.${checked.ext}`;
	await putObject(storageKey, stored, checked.mime);
	try {
		return await db.transaction(async (tx) => {
			const [locked] = await tx
				.select({ state: revisions.state, source: revisions.source })
				.from(revisions)
				.where(eq(revisions.id, revisionId))
				.for('update');
			if (locked?.state !== 'draft')
				throw new InstructionError(409, 'Files are frozen: the revision left draft.');
			const [{ id }] = await tx
				.insert(revisionFiles)
				.values({
					revisionId,
					kind: checked.kind,
					storageKey,
					originalName,
					contentType: checked.mime,
					sizeBytes: stored.byteLength,
					sha256,
					widthPx,
					heightPx,
					uploadedBy: actor.id
				})
				.$returningId();
			const contentHash = computeContentHash(
				locked.source,
				await listRevisionFiles(revisionId, tx)
			);
			await tx.update(revisions).set({ contentHash }).where(eq(revisions.id, revisionId));
			await recordAudit(tx, actor, {
				action: 'revision.file_added',
				entityType: 'revision',
				entityId: revisionId,
				newValues: {
					fileId: id,
					originalName,
					contentType: checked.mime,
					sizeBytes: stored.byteLength,
					sha256
				}
			});
			return {
				id,
				originalName,
				contentType: checked.mime,
				kind: checked.kind,
				sizeBytes: stored.byteLength
			};
		});
	} catch (err) {
		await deleteObject(storageKey);
		if (isDuplicateKey(err))
			throw new InstructionError(
				409,
				`A file named ${originalName} is already in this revision. Rename it or remove the other one first.`,
				{
					file: 'Name taken.'
				}
			);
		throw err;
	}
}

/** Removes a file from a draft revision. */
export async function removeRevisionFile(
	actor: Actor & { id: number },
	revisionId: number,
	fileId: number
) {
	const key = await db.transaction(async (tx) => {
		const [locked] = await tx
			.select({ state: revisions.state, source: revisions.source })
			.from(revisions)
			.where(eq(revisions.id, revisionId))
			.for('update');
		if (!locked) throw notFound();
		if (locked.state !== 'draft')
			throw new InstructionError(409, 'Files are frozen: the revision is not a draft.');
		const [f] = await tx
			.select()
			.from(revisionFiles)
			.where(and(eq(revisionFiles.id, fileId), eq(revisionFiles.revisionId, revisionId)));
		if (!f) throw notFound('No such file in this revision');
		await tx.delete(revisionFiles).where(eq(revisionFiles.id, fileId));
		const contentHash = computeContentHash(locked.source, await listRevisionFiles(revisionId, tx));
		await tx.update(revisions).set({ contentHash }).where(eq(revisions.id, revisionId));
		await recordAudit(tx, actor, {
			action: 'revision.file_removed',
			entityType: 'revision',
			entityId: revisionId,
			oldValues: { fileId, originalName: f.originalName, sha256: f.sha256 }
		});
		return f.storageKey;
	});
	await deleteObject(key);
}
