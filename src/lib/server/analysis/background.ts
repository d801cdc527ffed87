// Final analyses computed off the main thread. A 10⁶-reading run takes seconds to reduce and analyse;
// on the main thread that would hold up every request of every user meanwhile. In the built server a
// worker thread (this module started again as a worker entry, as the reducer is) computes them on a
// read-only connection, one at a time, and the main thread caches the result (run.analysis_json).
// A run is analysed as soon as it stops recording, so the run page usually finds the cache ready.
// In the Vite dev server and in unit tests (TypeScript a worker cannot load) nothing runs in the
// background and callers compute in place (storedRunAnalysis).

import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import SQLite from 'better-sqlite3';
import { computeRunAnalysis, saveRunAnalysis, type StoredRunAnalysis } from './run-analysis';

const WORKER_FLAG = 'stillpoint-analysis';
const KEY = Symbol.for('stillpoint.analysisWorker');

interface Pool {
	worker: Worker | null;
	pending: Map<number, { promise: Promise<void>; resolve: () => void }>;
	start: () => Worker;
}

type FromWorker = { runId: number; result: StoredRunAnalysis | null; error?: string };

function pool(sqlite: SQLite.Database, dbPath: string): Pool | null {
	const url = import.meta.url;
	if (dbPath === ':memory:' || !url.endsWith('.js') || process.env.STILLPOINT_ANALYSIS_WORKER === 'off') return null;
	const g = globalThis as typeof globalThis & { [KEY]?: Pool };
	if (g[KEY]) return g[KEY]!;
	const p: Pool = { worker: null, pending: new Map(), start: () => start() };
	const settleAll = () => {
		for (const w of p.pending.values()) w.resolve();
		p.pending.clear();
	};
	const start = () => {
		const w = new Worker(new URL(url), { workerData: { flag: WORKER_FLAG, dbPath } });
		w.on('message', (m: FromWorker) => {
			try {
				if (m.result) saveRunAnalysis(sqlite, m.result);
				else if (m.error) console.error(`analysis worker: run ${m.runId}: ${m.error}`);
			} finally {
				p.pending.get(m.runId)?.resolve();
				p.pending.delete(m.runId);
			}
		});
		w.on('error', (e) => console.error('analysis worker failed', e));
		// Whatever was waiting is released (callers then compute in place); the next request starts a new one.
		w.on('exit', () => {
			p.worker = null;
			settleAll();
		});
		w.unref();
		return w;
	};
	g[KEY] = p;
	return p;
}

/**
 * Has the run's analysis computed in the background and cached; resolves when it is (or when the
 * background is unavailable or failed: the caller then finds the cache stale and computes in place).
 */
export function analyseInBackground(sqlite: SQLite.Database, dbPath: string, runId: number): Promise<void> {
	const p = pool(sqlite, dbPath);
	if (!p) return Promise.resolve();
	const waiting = p.pending.get(runId);
	if (waiting) return waiting.promise;
	let resolve!: () => void;
	const promise = new Promise<void>((r) => (resolve = r));
	p.pending.set(runId, { promise, resolve });
	p.worker ??= p.start();
	p.worker.postMessage({ runId });
	return promise;
}

if (!isMainThread && (workerData as { flag?: string } | null)?.flag === WORKER_FLAG && parentPort) {
	const port = parentPort;
	const sqlite = new SQLite((workerData as { dbPath: string }).dbPath);
	sqlite.pragma('busy_timeout = 5000');
	sqlite.pragma('query_only = ON');
	// Messages queue up on the port; each analysis runs to its end before the next is taken.
	port.on('message', ({ runId }: { runId: number }) => {
		try {
			port.postMessage({ runId, result: computeRunAnalysis(sqlite, runId) } satisfies FromWorker);
		} catch (e) {
			port.postMessage({ runId, result: null, error: (e as Error).message } satisfies FromWorker);
		}
	});
}
