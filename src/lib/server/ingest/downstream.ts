// Where the reducer runs: in a worker thread in the built server (the second core does the reduction
// and the plateau tracking while the main thread parses, validates and commits), in-process in the
// Vite dev server and in unit tests (where this module is TypeScript a worker cannot load).
//
// The worker is this very module started again as a worker entry: the built chunk that holds it is
// plain ESM, so no separate bundle entry is needed.

import { isMainThread, MessageChannel, parentPort, Worker, workerData, type MessagePort } from 'node:worker_threads';
import SQLite from 'better-sqlite3';
import { Reducer, type ReducerUpdate } from './reducer';

export interface Downstream {
	/** New readings for the run; `rows`: what the commit stored, packed (packRows), ownership passes on. */
	notify(runId: number, rows?: Float64Array): void;
	drop(runId: number): void;
	close(): Promise<void>;
	readonly mode: 'worker' | 'inline';
	/**
	 * A port on which the writer thread hands each commit's rows straight to the reducer worker (no
	 * stop on the main thread); null when the reducer runs in-process. A new one after each restart.
	 */
	writerPort(): MessagePort | null;
	/** Called after the reducer worker was restarted (its ports are gone). */
	onRestart: (() => void) | null;
}

/** What the writer thread sends on a writer port: the rows of one commit, per run. */
export interface CommitRowsMessage {
	type: 'rows';
	runs: { runId: number; rows: Float64Array }[];
}

type ToWorker = { type: 'notify'; runId: number; rows?: Float64Array } | { type: 'drop'; runId: number } | { type: 'port'; port: MessagePort };
const WORKER_FLAG = 'stillpoint-reducer';

function transferables(u: ReducerUpdate): ArrayBuffer[] {
	return Object.values(u.columns).map((a) => (a as Float64Array | Uint8Array).buffer as ArrayBuffer);
}

export function createDownstream(opts: { sqlite: SQLite.Database; dbPath: string; onUpdate: (u: ReducerUpdate) => void; inline?: boolean }): Downstream {
	const url = import.meta.url;
	const canWorker = !opts.inline && opts.dbPath !== ':memory:' && url.endsWith('.js') && process.env.STILLPOINT_REDUCER !== 'inline';
	if (!canWorker) {
		const reducer = new Reducer(opts.sqlite, opts.onUpdate);
		reducer.loadRecording();
		return { mode: 'inline', notify: (id, rows) => reducer.notify(id, rows), drop: (id) => reducer.drop(id), close: async () => {}, writerPort: () => null, onRestart: null };
	}
	let worker: Worker | null = null;
	let closing = false;
	const start = () => {
		const w = new Worker(new URL(url), { workerData: { flag: WORKER_FLAG, dbPath: opts.dbPath } });
		w.on('message', (u: ReducerUpdate) => opts.onUpdate(u));
		w.on('error', (e) => console.error('reducer worker failed', e));
		w.on('exit', (code) => {
			worker = null;
			// A fresh worker replays every recording run from storage, so nothing is lost by a restart.
			if (!closing) {
				console.error(`reducer worker exited (${code}); restarting`);
				setTimeout(() => {
					worker = start();
					downstream.onRestart?.();
				}, 500).unref();
			}
		});
		w.unref();
		return w;
	};
	worker = start();
	const post = (m: ToWorker) => worker?.postMessage(m, m.type === 'notify' && m.rows ? [m.rows.buffer as ArrayBuffer] : m.type === 'port' ? [m.port] : []);
	const downstream: Downstream = {
		mode: 'worker',
		notify: (runId, rows) => post({ type: 'notify', runId, rows }),
		drop: (runId) => post({ type: 'drop', runId }),
		async close() {
			closing = true;
			await worker?.terminate();
		},
		writerPort() {
			if (!worker) return null;
			const { port1, port2 } = new MessageChannel();
			post({ type: 'port', port: port2 });
			return port1;
		},
		onRestart: null
	};
	return downstream;
}

if (!isMainThread && (workerData as { flag?: string } | null)?.flag === WORKER_FLAG && parentPort) {
	const port = parentPort;
	const sqlite = new SQLite((workerData as { dbPath: string }).dbPath);
	sqlite.pragma('busy_timeout = 5000');
	// This connection only reads: it must never take the write lock from the ingest.
	sqlite.pragma('query_only = ON');
	const reducer = new Reducer(sqlite, (u) => port.postMessage(u, transferables(u)));
	port.on('message', (m: ToWorker) => {
		if (m.type === 'notify') reducer.notify(m.runId, m.rows);
		else if (m.type === 'drop') reducer.drop(m.runId);
		else m.port.on('message', (c: CommitRowsMessage) => c.runs.forEach((r) => reducer.notify(r.runId, r.rows)));
	});
	reducer.loadRecording();
}
