// Starts the real, built server (node server.js) on a free loopback port with its own SQLite file.
// Integration tests use it; it needs `npm run build` first (scripts/test-all.sh does that).
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { createKysely, migrateToLatest, openSqlite } from '../../src/lib/server/db/index';
import { createAuth } from '../../src/lib/server/auth/better-auth';
import { seedDemo, type SeedResult } from '../../src/lib/server/demo/seed';

export const ROOT = resolve(import.meta.dirname, '../..');
export const TEST_SECRET = 'test-secret-for-stillpoint-integration-0123456789';

export async function freePort(): Promise<number> {
	return new Promise((ok, fail) => {
		const srv = createServer();
		srv.once('error', fail);
		srv.listen(0, '127.0.0.1', () => {
			const address = srv.address();
			const port = typeof address === 'object' && address ? address.port : 0;
			srv.close(() => ok(port));
		});
	});
}

/** Migrates and seeds a fresh database file with the demo laboratory. */
export async function seededDatabase(
	dbPath = join(mkdtempSync(join(tmpdir(), 'stillpoint-')), 'test.db'),
	options: { pastRuns?: boolean } = {}
): Promise<{ dbPath: string; seed: SeedResult }> {
	const db = createKysely(openSqlite(dbPath));
	await migrateToLatest(db);
	// Past runs (simulated, a few seconds) only where a test needs them.
	const seed = await seedDemo(db, createAuth({ db, secret: TEST_SECRET, baseURL: 'http://localhost' }), Date.now(), { pastRuns: options.pastRuns ?? false });
	await db.destroy();
	return { dbPath, seed };
}

export interface TestServer {
	baseUrl: string;
	port: number;
	dbPath: string;
	process: ChildProcess;
	output: () => string;
	stop(): Promise<void>;
	/** Kills the process with the signal (SIGKILL for a crash) and waits for it to exit. */
	kill(signal?: NodeJS.Signals): Promise<void>;
	/** Starts the server again on the same port and database. */
	restart(): Promise<void>;
}

export async function startTestServer(opts: { dbPath?: string; env?: Record<string, string>; port?: number } = {}): Promise<TestServer> {
	if (!existsSync(join(ROOT, 'build/handler.js'))) throw new Error('No build found: run `npm run build` before the integration tests.');
	const dbPath = opts.dbPath ?? (await seededDatabase()).dbPath;
	const port = opts.port ?? (await freePort());
	const baseUrl = `http://localhost:${port}`;
	let log = '';
	const launch = async () => {
		const child = spawn(process.execPath, [...(process.env.STILLPOINT_BENCH_CPU_PROF ? ['--cpu-prof', `--cpu-prof-dir=${process.env.STILLPOINT_BENCH_CPU_PROF}`] : []), 'server.js'], {
			cwd: ROOT,
			env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: baseUrl, STILLPOINT_DB: dbPath, STILLPOINT_SECRET: TEST_SECRET, ...opts.env },
			stdio: ['ignore', 'pipe', 'pipe']
		});
		child.stdout!.on('data', (d) => (log += d));
		child.stderr!.on('data', (d) => (log += d));
		const deadline = Date.now() + 20_000;
		for (;;) {
			if (child.exitCode !== null) throw new Error(`server exited early (${child.exitCode}):\n${log}`);
			try {
				const res = await fetch(`${baseUrl}/api/v1/health`);
				if (res.ok) break;
			} catch {
				/* not listening yet */
			}
			if (Date.now() > deadline) throw new Error(`server did not become healthy:\n${log}`);
			await new Promise((r) => setTimeout(r, 100));
		}
		return child;
	};
	const server: TestServer = {
		baseUrl,
		port,
		dbPath,
		process: await launch(),
		output: () => log,
		async kill(signal = 'SIGKILL') {
			const child = server.process;
			if (child.exitCode !== null || child.signalCode !== null) return;
			await new Promise<void>((ok) => {
				child.once('exit', () => ok());
				child.kill(signal);
			});
		},
		async stop() {
			await server.kill('SIGTERM');
		},
		async restart() {
			await server.kill('SIGTERM');
			server.process = await launch();
		}
	};
	return server;
}

/** Signs in through the app's own sign-in form and returns the session cookie header. */
export async function signInCookie(baseUrl: string, email: string, password: string): Promise<string> {
	const res = await fetch(`${baseUrl}/sign-in`, {
		method: 'POST',
		redirect: 'manual',
		headers: { origin: baseUrl, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams({ email, password })
	});
	const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0]);
	const session = cookies.filter((c) => c.startsWith('stillpoint.session_token') || c.startsWith('__Secure-stillpoint.session_token'));
	if (res.status !== 303 || session.length === 0) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`);
	return cookies.join('; ');
}
