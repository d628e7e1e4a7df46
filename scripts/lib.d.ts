// Types for lib.js, for the TypeScript that imports it (tests, benchmarks).

export declare const root: string;

export interface ModeConfig {
	mode: 'dev' | 'test';
	dataDir: string;
	dbDir: string;
	socket: string;
	dbPort: number;
	dbName: string;
	appPort: number;
	smtpPort: number;
	mailWebPort: number;
	s3Port: number;
	s3Dir: string;
	mailDir: string;
	runFile: string;
	balancerPort: number;
	instancePorts: number[];
	clusterDir: string;
	clusterRunFile: string;
	backupDir: string;
}

/** Ports and folders per mode (PADBRIDGE_PORT_OFFSET moves every port). */
export declare function modeConfig(mode: 'dev' | 'test'): ModeConfig;
export declare function log(msg: string): void;
export declare function fail(msg: string): never;
export declare function isRoot(): boolean;
export declare function ensureDebianPackages(names: string[]): void;
export declare function ensureNodeModules(): void;
export declare function run(cmd: string, args: string[], opts?: object): void;
export declare function secrets(cfg: ModeConfig): {
	appPassword: string;
	ownerPassword: string;
	authSecret: string;
};
export declare function dbUrls(cfg: ModeConfig): { app: string; owner: string };
export declare function processAlive(pid: number, name?: string): boolean;
/** Runs SQL as root over the socket; returns the batch output (tab-separated, no headers). */
export declare function mariadbCli(
	cfg: ModeConfig,
	sql: string,
	opts?: { database?: string }
): string;
export declare function ping(cfg: ModeConfig): boolean;
export declare function startMariadb(cfg: ModeConfig): Promise<{ pid: number; started: boolean }>;
export declare function stopMariadb(cfg: ModeConfig): void;
export declare function ensureDatabase(cfg: ModeConfig, opts?: { fresh?: boolean }): void;
export declare const APPEND_ONLY_TABLES: string[];
/** Takes away the app user's rights on cfg.dbName only. */
export declare function revokeAppUser(cfg: ModeConfig): void;
export declare function grantAppUser(cfg: ModeConfig): void;
export declare function countRows(cfg: ModeConfig, table: string): number;
export declare function newestMtime(paths: string[]): number;
export declare function waitForHttp(url: string, timeoutMs?: number): Promise<boolean>;
export declare function ensureBuild(): void;
export declare function appEnv(cfg: ModeConfig): Record<string, string>;
