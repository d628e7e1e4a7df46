// A second built server (`node build`) on a scratch database, its peak memory read from
// /proc/PID/status, and a streamed download through it. Shared by the records benchmark and the
// bounded-memory integration test.
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';

const root = resolve(import.meta.dirname, '../..');

async function waitForHealth(url: string, timeoutMs: number): Promise<boolean> {
	const until = Date.now() + timeoutMs;
	while (Date.now() < until) {
		try {
			const res = await fetch(url);
			await res.arrayBuffer();
			if (res.status === 200) return true;
		} catch {
			// not up yet
		}
		await sleep(200);
	}
	return false;
}

export interface BuiltApp {
	url: string;
	pid: number;
	stop(): Promise<void>;
}

/** Starts the built app on `port` against `databaseUrl`, with the scheduler off. */
export async function startBuiltApp(
	port: number,
	databaseUrl: string,
	env: Record<string, string | undefined>,
	/** The site's public address (ORIGIN); the server still listens on 127.0.0.1. */
	origin?: string
): Promise<BuiltApp> {
	const url = `http://127.0.0.1:${port}`;
	const child: ChildProcess = spawn(process.execPath, [join(root, 'build')], {
		cwd: root,
		env: {
			...env,
			NODE_ENV: 'production',
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: origin ?? url,
			DATABASE_URL: databaseUrl,
			PADBRIDGE_JOBS: 'off'
		},
		stdio: ['ignore', 'ignore', 'inherit']
	});
	// adapter-node closes its listener on SIGTERM, but the database pool keeps the process alive:
	// give it a moment, then end it.
	const stop = async () => {
		if (child.exitCode !== null || child.signalCode !== null) return;
		const exited = new Promise((resolve) => child.once('exit', resolve));
		child.kill('SIGTERM');
		const timer = setTimeout(() => child.kill('SIGKILL'), 3000);
		await exited;
		clearTimeout(timer);
	};
	if (!(await waitForHealth(`${url}/api/health`, 30_000))) {
		await stop();
		throw new Error(`the built app did not start on ${url} (run \`npm run build\` first)`);
	}
	return { url, pid: child.pid!, stop };
}

/** Signs in with e-mail and password; returns the Cookie header value. */
export async function signIn(url: string, email: string, password: string): Promise<string> {
	const res = await fetch(`${url}/signin?/password`, {
		method: 'POST',
		redirect: 'manual',
		headers: {
			origin: url,
			accept: 'text/html',
			'content-type': 'application/x-www-form-urlencoded'
		},
		body: new URLSearchParams({ email, password, redirectTo: '/' })
	});
	await res.arrayBuffer();
	const cookie = res.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.join('; ');
	if (res.status !== 303 || !cookie.includes('session-token'))
		throw new Error(`sign-in as ${email} failed: HTTP ${res.status}`);
	return cookie;
}

/** Resident memory of a process from /proc/PID/status, in MiB: now and the peak (VmHWM). */
export function memoryOf(pid: number): { rssMiB: number; peakMiB: number } {
	const status = readFileSync(`/proc/${pid}/status`, 'utf8');
	const kb = (name: string) => Number(new RegExp(`${name}:\\s+(\\d+) kB`).exec(status)?.[1] ?? NaN);
	return { rssMiB: kb('VmRSS') / 1024, peakMiB: kb('VmHWM') / 1024 };
}

/**
 * Resets the peak to the current resident size (Linux `clear_refs` value 5), so the next peak
 * belongs to what runs next. False where the kernel or the permissions do not allow it.
 */
export function resetPeak(pid: number): boolean {
	try {
		writeFileSync(`/proc/${pid}/clear_refs`, '5');
		return true;
	} catch {
		return false;
	}
}

export interface Download {
	status: number;
	bytes: number;
	/** CRLF-ended lines in the body (CSV records including the header). */
	lines: number;
	/** The first chunk's bytes (for the BOM or the zip signature). */
	head: Uint8Array;
	/** Milliseconds until the response headers came, and until the last byte. */
	firstMs: number;
	totalMs: number;
	recordCount: string | null;
}

/** Streams a download to nowhere, counting bytes and CRLFs, never holding the body. */
export async function download(url: string, cookie: string): Promise<Download> {
	const started = performance.now();
	const res = await fetch(url, { headers: { cookie } });
	const firstMs = performance.now() - started;
	let bytes = 0;
	let lines = 0;
	let head = new Uint8Array();
	let prev = 0;
	const reader = res.body!.getReader();
	for (;;) {
		const { done, value } = await reader.read();
		if (done) break;
		if (!bytes) head = value.slice(0, 16);
		for (let i = 0; i < value.length; i++) {
			if (value[i] === 10 && (i > 0 ? value[i - 1] : prev) === 13) lines++;
		}
		prev = value[value.length - 1] ?? prev;
		bytes += value.length;
	}
	return {
		status: res.status,
		bytes,
		lines,
		head,
		firstMs,
		totalMs: performance.now() - started,
		recordCount: res.headers.get('x-record-count')
	};
}
