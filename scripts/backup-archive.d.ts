// Types for backup-archive.js, for the TypeScript that imports it (the restore drill).
import type { S3Client } from '@aws-sdk/client-s3';
import type { ModeConfig } from './lib.js';

export declare const BACKUP_FORMAT: string;

export interface S3Settings {
	endpoint: string | undefined;
	region: string;
	bucket: string;
	accessKeyId: string;
	secretAccessKey: string;
}

/** The object store the mode's app uses (or the S3_* environment), optionally another bucket. */
export declare function s3Settings(cfg: ModeConfig, bucket?: string): S3Settings;

export declare function s3Client(s: S3Settings): S3Client;
export declare function listKeys(client: S3Client, bucket: string): Promise<string[]>;
export declare function fetchObject(
	client: S3Client,
	bucket: string,
	key: string
): Promise<{ bytes: Uint8Array; contentType: string }>;

export declare function emptyBucket(client: S3Client, bucket: string): Promise<void>;

/** Row counts of every table of `database`, read in one consistent snapshot. */
export declare function tableRowCounts(cfg: ModeConfig, database: string): Record<string, number>;

export interface BackupResult {
	file: string;
	bytes: number;
	dumpBytes: number;
	objects: number;
	objectBytes: number;
	tables: number;
	rowCounts: Record<string, number>;
	dumpSeconds: number;
	seconds: number;
}

export declare function createBackup(
	cfg: ModeConfig,
	opts?: { outFile?: string; database?: string; bucket?: string }
): Promise<BackupResult>;

export interface RestoreResult {
	database: string;
	bucket: string;
	createdAt: string;
	tables: number;
	rowCounts: Record<string, number>;
	countNotes: string[];
	objects: number;
	dbSeconds: number;
	seconds: number;
}

export declare function restoreBackup(
	cfg: ModeConfig,
	file: string,
	opts?: { database?: string; bucket?: string; force?: boolean }
): Promise<RestoreResult>;

export declare function withLocalServices<T>(cfg: ModeConfig, fn: () => Promise<T>): Promise<T>;
