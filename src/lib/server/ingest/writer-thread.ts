// Where the writer of readings runs. In the built server: a thread of its own, on its own connection,
// so that the inserts and commits (about a third of the main thread's time under HTTP batch load)
// overlap the HTTP, JSON and validation work of the main thread on the second core. In the Vite dev
// server, in unit tests (TypeScript a worker cannot load), for in-memory databases and with
// STILLPOINT_WRITER=inline: in-process on the app's handle.
//
// The thread is this very module started again as a worker entry (as the reducer's is, downstream.ts).
// Submissions go to it packed in one Float64Array (packSubmissions): an HTTP batch at once, WebSocket
// frames once per turn of the event loop. It answers with packed results (packResults). Each commit's
// stored rows, packed as the reducer takes them (packRows), go straight to the reducer worker on a
// port of their own (downstream.ts, writerPort), or to the main thread when the reducer runs there.
// The durability rule is the writer's own: nothing is answered before the commit holding it is on disk.
//
// If the thread dies, everything it had not answered is answered with storage_error (the senders send
// it again; what had been committed comes back as duplicates) and a new thread is started.

import { isMainThread, parentPort, Worker, workerData, type MessagePort } from 'node:worker_threads';
import type SQLite from 'better-sqlite3';
import { openSqlite } from '../db/connection';
import { GROUP_MAX_ROWS, GROUP_WINDOW_MS, LAST_USED_WRITE_INTERVAL_MS } from './limits';
import type { CommitRowsMessage } from './downstream';
import { PACKED_STRIDE, packRows, packRowsInto } from './reducer';
import type { ValidReading } from './validate';
import { GroupCommitWriter, type ReadingWriter, type Submission, type SubmissionResult } from './writer';

/** Called on the main thread with what each commit stored for a run (packRows layout; ownership passes on). */
export type OnCommitRows = (runId: number, rows: Float64Array) => void;

const WORKER_FLAG = 'stillpoint-writer';
/** Floats per reading in a packed submission: the reducer's packed layout (packRows). */
const READING_FLOATS = PACKED_STRIDE;
/** Floats before a submission's readings: id, runId, tokenId (-1: none), reading count. */
const HEAD_FLOATS = 4;
/** Submitted rows that go to the thread at once rather than at the end of the event loop's turn. */
const SEND_AT_ONCE_ROWS = 100;
/** Floats per answered submission: id, accepted, duplicates, highestDurableSeq, timeBackwards. */
const RESULT_FLOATS = 5;

type FailureCode = Extract<SubmissionResult, { ok: false }>['code'];
export interface PackedSubmission {
	id: number;
	runId: number;
	tokenId: number | null;
	readings: ValidReading[];
}
export interface Failure {
	id: number;
	code: FailureCode;
	message: string;
}
type ToThread = { type: 'submit'; buf: Float64Array } | { type: 'close' } | { type: 'reducer-port'; port: MessagePort };
type FromThread = { type: 'commit'; runs: { runId: number; rows: Float64Array }[] } | { type: 'results'; ok: Float64Array; failed: Failure[] } | { type: 'closed' };

export function packSubmissions(subs: readonly PackedSubmission[]): Float64Array {
	let size = 0;
	for (const s of subs) size += HEAD_FLOATS + s.readings.length * READING_FLOATS;
	const out = new Float64Array(size);
	let o = 0;
	for (const s of subs) {
		out[o++] = s.id;
		out[o++] = s.runId;
		out[o++] = s.tokenId ?? -1;
		out[o++] = s.readings.length;
		o = packRowsInto(out, o, s.readings);
	}
	return out;
}

export function unpackSubmissions(buf: Float64Array): PackedSubmission[] {
	const subs: PackedSubmission[] = [];
	let o = 0;
	while (o < buf.length) {
		const id = buf[o++];
		const runId = buf[o++];
		const token = buf[o++];
		const n = buf[o++];
		const readings: ValidReading[] = new Array(n);
		for (let i = 0; i < n; i++, o += READING_FLOATS) readings[i] = { seq: buf[o], timeMs: buf[o + 1], ratio: buf[o + 2], currentMilliAmp: buf[o + 3], channel: buf[o + 4] };
		subs.push({ id, runId, tokenId: token < 0 ? null : token, readings });
	}
	return subs;
}

export type OkResult = Extract<SubmissionResult, { ok: true }>;

export function packResults(results: readonly { id: number; result: OkResult }[]): Float64Array {
	const out = new Float64Array(results.length * RESULT_FLOATS);
	results.forEach(({ id, result: r }, i) => out.set([id, r.accepted, r.duplicates, r.highestDurableSeq, r.timeBackwards], i * RESULT_FLOATS));
	return out;
}

export function unpackResults(buf: Float64Array): { id: number; result: OkResult }[] {
	const out: { id: number; result: OkResult }[] = [];
	for (let o = 0; o < buf.length; o += RESULT_FLOATS) out.push({ id: buf[o], result: { ok: true, accepted: buf[o + 1], duplicates: buf[o + 2], highestDurableSeq: buf[o + 3], timeBackwards: buf[o + 4] } });
	return out;
}

function inlineWriter(sqlite: SQLite.Database, onCommitRows: OnCommitRows): GroupCommitWriter {
	return new GroupCommitWriter(sqlite, {
		windowMs: GROUP_WINDOW_MS,
		maxRows: GROUP_MAX_ROWS,
		lastUsedIntervalMs: LAST_USED_WRITE_INTERVAL_MS,
		onCommit: (committed) => {
			for (const c of committed) if (c.stored.length > 0) onCommitRows(c.runId, packRows(c.stored));
		}
	});
}

export interface ThreadWriterLinks {
	/** A port to the reducer worker for the committed rows (null: they come to the main thread). */
	reducerPort?: () => MessagePort | null;
	/**
	 * Called after the thread died and a new one started: rows it committed but had not handed on are
	 * known only to storage, so the reducer must be told to read it.
	 */
	onRestart?: () => void;
}

/** The main thread's side of the writer thread (exported for its test, which starts a stand-in thread). */
export class ThreadWriter implements ReadingWriter {
	readonly mode = 'thread';
	private worker: Worker | null = null;
	private nextId = 1;
	/** submitted, not yet answered, by id */
	private readonly open = new Map<number, Submission>();
	/** submitted, not yet sent to the thread */
	private outgoing: PackedSubmission[] = [];
	private outgoingRows = 0;
	private sendScheduled = false;
	private sendNowScheduled = false;
	private rows = 0;
	private closed = false;
	private closedWaiter: (() => void) | null = null;

	constructor(
		private readonly dbPath: string,
		private readonly url: string,
		private readonly onCommitRows: OnCommitRows,
		private readonly links: ThreadWriterLinks
	) {
		this.worker = this.start();
	}

	get pendingRows(): number {
		return this.rows;
	}

	submit(s: Submission): void {
		if (this.closed) return s.done({ ok: false, code: 'shutting_down', message: 'The server is shutting down; retry shortly.' });
		const id = this.nextId++;
		this.open.set(id, s);
		this.rows += s.readings.length;
		this.outgoing.push({ id, runId: s.runId, tokenId: s.tokenId, readings: s.readings });
		this.outgoingRows += s.readings.length;
		if (this.outgoingRows >= SEND_AT_ONCE_ROWS) {
			// A batch (an HTTP request) goes over at once, not after this turn's other requests are parsed
			// (measured: half a millisecond more per request under load).
			if (!this.sendNowScheduled) {
				this.sendNowScheduled = true;
				queueMicrotask(() => {
					this.sendNowScheduled = false;
					this.send();
				});
			}
		} else if (!this.sendScheduled) {
			this.sendScheduled = true;
			// Single readings (WebSocket frames): everything submitted in this turn of the event loop (the
			// frames of every socket that had data) goes over in one message.
			setImmediate(() => {
				this.sendScheduled = false;
				this.send();
			});
		}
	}

	write(runId: number, tokenId: number | null, readings: ValidReading[]): Promise<SubmissionResult> {
		return new Promise((done) => this.submit({ runId, tokenId, readings, done }));
	}

	/** A new port to the reducer worker (after the reducer restarted). */
	useReducerPort(port: MessagePort): void {
		if (this.worker) this.worker.postMessage({ type: 'reducer-port', port } satisfies ToThread, [port]);
		else port.close();
	}

	async close(): Promise<void> {
		if (this.closed) return;
		this.closed = true;
		this.send();
		if (this.worker) {
			const w = this.worker;
			await new Promise<void>((resolve) => {
				this.closedWaiter = resolve;
				w.postMessage({ type: 'close' } satisfies ToThread);
			});
			await w.terminate();
		}
		this.failOpen('shutting_down', 'The server is shutting down; retry shortly.');
	}

	private send(): void {
		if (this.outgoing.length === 0 || !this.worker) return;
		const buf = packSubmissions(this.outgoing);
		this.outgoing = [];
		this.outgoingRows = 0;
		this.worker.postMessage({ type: 'submit', buf } satisfies ToThread, [buf.buffer as ArrayBuffer]);
	}

	private answer(id: number, result: SubmissionResult): void {
		const s = this.open.get(id);
		if (!s) return;
		this.open.delete(id);
		this.rows -= s.readings.length;
		s.done(result);
	}

	private failOpen(code: FailureCode, message: string): void {
		for (const id of [...this.open.keys()]) this.answer(id, { ok: false, code, message });
		this.outgoing = [];
		this.outgoingRows = 0;
	}

	private onMessage(m: FromThread): void {
		if (m.type === 'commit') {
			for (const r of m.runs) {
				try {
					this.onCommitRows(r.runId, r.rows);
				} catch (e) {
					// The rows are durable; a failure downstream (reduction, live) must not fail the ingest.
					console.error('ingest: post-commit stage failed', e);
				}
			}
		} else if (m.type === 'results') {
			for (const { id, result } of unpackResults(m.ok)) this.answer(id, result);
			for (const f of m.failed) this.answer(f.id, { ok: false, code: f.code, message: f.message });
		} else if (m.type === 'closed') this.closedWaiter?.();
	}

	private start(): Worker {
		const reducerPort = this.links.reducerPort?.() ?? null;
		const w = new Worker(new URL(this.url), { workerData: { flag: WORKER_FLAG, dbPath: this.dbPath, reducerPort }, transferList: reducerPort ? [reducerPort] : [] });
		w.on('message', (m: FromThread) => this.onMessage(m));
		w.on('error', (e) => console.error('ingest: writer thread failed', e));
		w.on('exit', (code) => {
			if (this.worker !== w) return;
			this.worker = null;
			if (this.closed) return this.closedWaiter?.();
			console.error(`ingest: writer thread exited (${code}); restarting`);
			// Unknown whether it committed them: the senders send them again and meet duplicates if so.
			this.failOpen('storage_error', 'The writer stopped before confirming these readings; send them again.');
			setTimeout(() => {
				if (this.closed) return;
				this.worker = this.start();
				this.links.onRestart?.();
				this.send(); // what was submitted while there was no thread
			}, 200).unref();
		});
		w.unref();
		return w;
	}
}

/** The process's writer of readings: on its own thread where it can be, else in-process on `sqlite`. */
export function createReadingWriter(opts: { sqlite: SQLite.Database; dbPath: string; onCommitRows: OnCommitRows; inline?: boolean } & ThreadWriterLinks): ReadingWriter {
	const url = import.meta.url;
	const canThread = !opts.inline && opts.dbPath !== ':memory:' && url.endsWith('.js') && process.env.STILLPOINT_WRITER !== 'inline';
	return canThread ? new ThreadWriter(opts.dbPath, url, opts.onCommitRows, opts) : inlineWriter(opts.sqlite, opts.onCommitRows);
}

// ---------------------------------------------------------------- the thread

if (!isMainThread && (workerData as { flag?: string } | null)?.flag === WORKER_FLAG && parentPort) {
	const port = parentPort;
	const data = workerData as { dbPath: string; reducerPort: MessagePort | null };
	const sqlite = openSqlite(data.dbPath);
	// Only the writer's statements run on this connection, and it checks each run inside its own
	// transaction (see GroupCommitWriter.flush): the per-row foreign-key lookup stays off for good.
	sqlite.pragma('foreign_keys = OFF');
	// Committed rows go straight to the reducer worker when there is one (else to the main thread).
	let reducerPort = data.reducerPort;
	let ok: { id: number; result: OkResult }[] = [];
	let failed: Failure[] = [];
	let flushScheduled = false;
	// A group's answers come in one synchronous loop (after its fsync): one message for all of them.
	const flushResults = () => {
		flushScheduled = false;
		if (ok.length === 0 && failed.length === 0) return;
		const buf = packResults(ok);
		port.postMessage({ type: 'results', ok: buf, failed } satisfies FromThread, [buf.buffer as ArrayBuffer]);
		ok = [];
		failed = [];
	};
	const answered = (id: number, r: SubmissionResult) => {
		if (r.ok) ok.push({ id, result: r });
		else failed.push({ id, code: r.code, message: r.message });
		if (!flushScheduled) {
			flushScheduled = true;
			queueMicrotask(flushResults);
		}
	};
	const writer = new GroupCommitWriter(sqlite, {
		// No window and overlapping fsyncs: with the loop to itself, the writer commits whatever queued up
		// while it wrote the last group and answers each group as soon as its own fsync is done.
		windowMs: 0,
		overlappingSyncs: true,
		maxRows: GROUP_MAX_ROWS,
		lastUsedIntervalMs: LAST_USED_WRITE_INTERVAL_MS,
		// Handed on at the commit, before the group's answers (they wait for its fsync).
		onCommit: (committed) => {
			const runs = committed.filter((c) => c.stored.length > 0).map((c) => ({ runId: c.runId, rows: packRows(c.stored) }));
			if (runs.length === 0) return;
			const transfer = runs.map((r) => r.rows.buffer as ArrayBuffer);
			if (reducerPort) reducerPort.postMessage({ type: 'rows', runs } satisfies CommitRowsMessage, transfer);
			else port.postMessage({ type: 'commit', runs } satisfies FromThread, transfer);
		}
	});
	port.on('message', (m: ToThread) => {
		if (m.type === 'reducer-port') {
			reducerPort?.close();
			reducerPort = m.port;
		} else if (m.type === 'submit') {
			for (const s of unpackSubmissions(m.buf)) writer.submit({ runId: s.runId, tokenId: s.tokenId, readings: s.readings, done: (r) => answered(s.id, r) });
		} else {
			void writer.close().then(() => {
				flushResults();
				sqlite.close();
				port.postMessage({ type: 'closed' } satisfies FromThread);
			});
		}
	});
}
