// Object storage through the AWS S3 SDK: the local fake in development and tests, any
// S3-compatible store in production (S3_ENDPOINT, S3_BUCKET, S3_REGION, credentials).
import {
	CopyObjectCommand,
	DeleteObjectCommand,
	GetObjectCommand,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';

const env = process.env;

let client: S3Client | null = null;

function s3(): S3Client {
	client ??= new S3Client({
		endpoint: env.S3_ENDPOINT || undefined,
		region: env.S3_REGION ?? 'us-east-1',
		forcePathStyle: true,
		credentials: {
			accessKeyId: env.S3_ACCESS_KEY_ID ?? 'S3RVER',
			secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? 'S3RVER'
		}
	});
	return client;
}

const bucket = () => env.S3_BUCKET ?? 'padbridge';

/** Stores bytes under `key`. */
export async function putObject(key: string, body: Uint8Array, contentType: string) {
	await s3().send(
		new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType })
	);
}

/** The object's body as a web stream, or null when the store has no such key. */
export async function getObjectStream(key: string): Promise<ReadableStream | null> {
	try {
		const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
		return res.Body ? res.Body.transformToWebStream() : null;
	} catch (err) {
		if ((err as { name?: string }).name === 'NoSuchKey') return null;
		throw err;
	}
}

export async function deleteObject(key: string) {
	await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}

/** Copies an object to a new key (a new revision gets its own copy of each file). */
export async function copyObject(fromKey: string, toKey: string) {
	await s3().send(
		new CopyObjectCommand({ Bucket: bucket(), CopySource: `${bucket()}/${fromKey}`, Key: toKey })
	);
}
