// The one writer of readings: group commit on better-sqlite3.
//
// Submissions (an HTTP batch, a WebSocket frame) queue up; a group closes windowMs after its first
// submission (GROUP_WINDOW_MS in-process; no window on the writer thread: a group is what queued up while
// the previous one was written) or at GROUP_MAX_ROWS rows, whichever comes first, and is written in one
// IMMEDIATE transaction with prepared statements. No submission is answered before the commit that holds it is on
// disk, so a crash (of the process, of the machine, of the power) loses nothing acknowledged:
//
// - On a WAL database (the product's), the commit itself runs at synchronous=NORMAL, which writes the
//   WAL frames but does not fsync them, and the writer then fsyncs the WAL file on libuv's thread pool
//   and answers the group's submissions when that fsync completes. That is the guarantee of
//   synchronous=FULL (the WAL is synced after each commit) without blocking the event loop for the
//   fsync; groups committed while one fsync is in flight share the next (or, with overlappingSyncs, on
//   the writer thread, each group gets its own fsync at once). A checkpoint that moves frames
//   into the database file fsyncs it first (SQLite does that at NORMAL), so frames overwritten after a
//   checkpoint are already durable there.
// - Otherwise (a rollback-journal or in-memory database: some tests) the commit runs at
//   synchronous=FULL and is answered at once.
//
// In the built server it runs on a thread of its own with its own connection (writer-thread.ts), so
// that the inserts overlap the main thread's HTTP and JSON work; other connections (the main thread's,
// other processes) meet busy_timeout. In-process (dev server, unit tests, STILLPOINT_WRITER=inline) it
// shares the app's sqlite handle, which Kysely uses too, and a Kysely transaction may be open across an
// await. Writing then would put our rows into someone else's transaction, so a group waits (a
// millisecond at a time) until the handle is outside a transaction.

import { closeSync, fdatasync, openSync } from 'node:fs';
import type { MessagePort } from 'node:worker_threads';
import type SQLite from 'better-sqlite3';
import type { ValidReading } from './validate';

export interface Submission {
	runId: number;
	/** Token that sent it, for bench_token.last_used_at; null for internal callers. */
	tokenId: number | null;
	readings: ValidReading[];
	done: (result: SubmissionResult) => void;
}

export type SubmissionResult =
	| {
			ok: true;
			accepted: number;
			duplicates: number;
			/** run.highest_seq after the commit */
			highestDurableSeq: number;
			/** readings stored whose timeMs is earlier than one the run already had (docs/ingest-protocol.md) */
			timeBackwards: number;
	  }
	| { ok: false; code: 'run_not_found' | 'run_not_recording' | 'storage_error' | 'shutting_down'; message: string };

/** What a commit stored, per run, for the reduction / live stage that follows it. */
export interface CommittedRun {
	runId: number;
	stored: ValidReading[];
	highestDurableSeq: number;
}

/** What the endpoints need of a writer: this class in-process, or its proxy on the writer thread. */
export interface ReadingWriter {
	submit(s: Submission): void;
	/** Promise form for HTTP handlers. */
	write(runId: number, tokenId: number | null, readings: ValidReading[]): Promise<SubmissionResult>;
	/** readings submitted and not yet answered */
	readonly pendingRows: number;
	/** Writes what is queued, then refuses new submissions (graceful shutdown). */
	close(): Promise<void>;
	readonly mode: 'thread' | 'inline';
	/** The writer thread only: a new port to the reducer worker for the committed rows. */
	useReducerPort?(port: MessagePort): void;
}

/** Rows per multi-row INSERT on the fast path (6 parameters each; SQLite allows 32 766). */
const MULTI_ROWS = 100;

class FastPathMiss extends Error {}

export interface WriterOptions {
	/**
	 * A group closes this long after its first submission. 0: no window, a group is what queued up while
	 * the previous one was being written (the writer thread, where nothing else competes for the loop).
	 */
	windowMs: number;
	maxRows: number;
	lastUsedIntervalMs: number;
	now?: () => number;
	/** Called synchronously after each successful commit, before any submission is answered. */
	onCommit?: (runs: CommittedRun[]) => void;
	/**
	 * Makes the committed WAL durable (default: fsync of the database's -wal file). Tests pass their own
	 * to observe or fail it; null forces the synchronous=FULL commit even on a WAL database.
	 */
	syncWal?: ((done: (error: Error | null) => void) => void) | null;
	/**
	 * Start an fsync for each commit at once, even while another is in flight (each still answers only
	 * the groups committed before it started). Off: one at a time, the next covering everything
	 * committed meanwhile; on a thread of its own the writer answers sooner with it on (measured by the
	 * ingest benchmark), in-process it measured no faster.
	 */
	overlappingSyncs?: boolean;
}

export interface WriterStats {
	commits: number;
	rows: number;
	pendingRows: number;
	lastGroupRows: number;
	busyRetries: number;
	/** fsyncs of the WAL (each covers every group committed before it started), and their total time */
	walSyncs: number;
	walSyncMs: number;
}

export class GroupCommitWriter implements ReadingWriter {
	readonly mode = 'inline';
	private queue: Submission[] = [];
	private queuedRows = 0;
	private timer: NodeJS.Timeout | null = null;
	private immediate: NodeJS.Immediate | null = null;
	private closed = false;
	private drainWaiters: (() => void)[] = [];
	private readonly lastUsedWrittenMs = new Map<number, number>();
	/** the largest timeMs stored per recording run, as of the last commit (for timeBackwards) */
	private readonly maxTimeMs = new Map<number, number>();
	/** set for one retry when the fast path met a row it did not expect (see writeGroup) */
	private slowOnce = false;
	private readonly params: (number | null)[] = new Array(MULTI_ROWS * 6);
	private readonly statements: {
		insert: SQLite.Statement;
		insertMany: SQLite.Statement;
		runState: SQLite.Statement<[number], { state: string; highest_seq: number }>;
		maxTime: SQLite.Statement<[number], { t: number | null }>;
		foreignKeys: SQLite.Statement<[], number>;
		updateRun: SQLite.Statement;
		touchToken: SQLite.Statement;
	};
	private readonly now: () => number;
	readonly stats: WriterStats = { commits: 0, rows: 0, pendingRows: 0, lastGroupRows: 0, busyRetries: 0, walSyncs: 0, walSyncMs: 0 };
	private readonly syncWal: ((done: (error: Error | null) => void) => void) | null;
	private walFd: number | null = null;
	/** answers of committed groups waiting for an fsync that starts after their commit */
	private awaitingSync: ((error: Error | null) => void)[] = [];
	/** fsyncs in flight (at most one unless overlappingSyncs) */
	private syncing = 0;
	private syncIdleWaiters: (() => void)[] = [];

	constructor(
		private readonly sqlite: SQLite.Database,
		private readonly o: WriterOptions
	) {
		this.now = o.now ?? Date.now;
		const wal = !sqlite.memory && String(sqlite.pragma('journal_mode', { simple: true })).toLowerCase() === 'wal';
		this.syncWal = o.syncWal === null || !wal ? null : (o.syncWal ?? ((done) => this.fsyncWalFile(done)));
		this.statements = {
			// OR IGNORE: the primary key (run_id, seq) turns a repeated seq into "0 changes" = a duplicate.
			insert: sqlite.prepare('insert or ignore into reading (run_id, seq, time_ms, ratio, current_ma, channel) values (?, ?, ?, ?, ?, ?)'),
			insertMany: sqlite.prepare(`insert or ignore into reading (run_id, seq, time_ms, ratio, current_ma, channel) values ${new Array(MULTI_ROWS).fill('(?, ?, ?, ?, ?, ?)').join(', ')}`),
			runState: sqlite.prepare('select state, highest_seq from run where id = ?'),
			maxTime: sqlite.prepare('select max(time_ms) as t from reading where run_id = ?'),
			// prepared once: sqlite.pragma() compiles its statement on every call
			foreignKeys: sqlite.prepare<[], number>('pragma foreign_keys').pluck(),
			updateRun: sqlite.prepare('update run set reading_count = reading_count + ?, highest_seq = max(highest_seq, ?), last_reading_at = ? where id = ?'),
			touchToken: sqlite.prepare('update bench_token set last_used_at = ? where id = ?')
		};
	}

	get pendingRows(): number {
		return this.queuedRows;
	}

	submit(s: Submission): void {
		if (this.closed) {
			s.done({ ok: false, code: 'shutting_down', message: 'The server is shutting down; retry shortly.' });
			return;
		}
		this.queue.push(s);
		this.queuedRows += s.readings.length;
		this.stats.pendingRows = this.queuedRows;
		if (this.queuedRows >= this.o.maxRows || this.o.windowMs === 0) this.flushSoon();
		else if (!this.timer) this.timer = setTimeout(() => this.flush(), this.o.windowMs);
	}

	/** Promise form for HTTP handlers. */
	write(runId: number, tokenId: number | null, readings: ValidReading[]): Promise<SubmissionResult> {
		return new Promise((done) => this.submit({ runId, tokenId, readings, done }));
	}

	/** Writes what is queued, then refuses new submissions (graceful shutdown). */
	async close(): Promise<void> {
		this.closed = true;
		while (this.queue.length > 0) {
			this.flush();
			if (this.queue.length > 0) await new Promise((r) => setTimeout(r, 2));
		}
		if (this.syncing > 0) await new Promise<void>((r) => this.syncIdleWaiters.push(r));
		if (this.walFd !== null) closeSync(this.walFd);
		this.walFd = null;
	}

	/** The default syncWal: fsync of the -wal file, opened once (its inode lives as long as our connection). */
	private fsyncWalFile(done: (error: Error | null) => void): void {
		try {
			this.walFd ??= openSync(`${this.sqlite.name}-wal`, 'r');
		} catch (e) {
			return done(e as Error);
		}
		fdatasync(this.walFd, (e) => done(e));
	}

	/** Runs answer() once the WAL holding the group just committed is on disk. */
	private whenDurable(answer: (error: Error | null) => void): void {
		this.awaitingSync.push(answer);
		if (this.syncing === 0 || this.o.overlappingSyncs) this.startSync();
	}

	private startSync(): void {
		const batch = this.awaitingSync;
		this.awaitingSync = [];
		this.syncing++;
		this.stats.walSyncs++;
		const t0 = performance.now();
		this.syncWal!((error) => {
			this.stats.walSyncMs += performance.now() - t0;
			this.syncing--;
			for (const answer of batch) answer(error);
			// What queued up during the fsync is committed now, so that the next fsync covers it too
			// (rather than waiting for its window and then for one more fsync).
			if (this.queue.length > 0 && !this.closed) this.flush();
			if (this.awaitingSync.length > 0) {
				if (this.syncing === 0) this.startSync();
			} else if (this.syncing === 0) for (const w of this.syncIdleWaiters.splice(0)) w();
		});
	}

	/** Resolves once everything queued so far is committed (or refused). */
	drained(): Promise<void> {
		if (this.queue.length === 0) return Promise.resolve();
		return new Promise((r) => this.drainWaiters.push(r));
	}

	private flushSoon(): void {
		if (this.immediate) return;
		this.immediate = setImmediate(() => {
			this.immediate = null;
			this.flush();
		});
	}

	private retryLater(): void {
		if (this.timer) return;
		this.timer = setTimeout(() => this.flush(), 1);
	}

	/** Writes one group. Synchronous: nothing else runs on the handle while it does. */
	flush(): void {
		if (this.timer) {
			clearTimeout(this.timer);
			this.timer = null;
		}
		if (this.queue.length === 0) return;
		if (this.sqlite.inTransaction) return this.retryLater();
		// Take submissions up to the row cap (a single submission is never split).
		let take = 0;
		let rows = 0;
		while (take < this.queue.length && (take === 0 || rows + this.queue[take].readings.length <= this.o.maxRows)) rows += this.queue[take++].readings.length;
		const group = this.queue.slice(0, take);
		const results: SubmissionResult[] = new Array(group.length);
		const committed = new Map<number, CommittedRun>();
		const nowMs = this.now();
		let runs = new Map<number, GroupRun>();
		// reading.run_id references run(id). The group reads each run's row inside its own IMMEDIATE
		// transaction and writes only to runs that exist and are recording, so the foreign-key lookup
		// SQLite would make for every single row proves nothing more; it is switched off for this
		// transaction only (the pragma takes effect only outside a transaction, hence around it), and
		// nothing else can run on the handle in between: flush is synchronous.
		const write = (): Map<number, GroupRun> => {
			const foreignKeys = this.statements.foreignKeys.get() === 1;
			if (foreignKeys) this.sqlite.pragma('foreign_keys = OFF');
			try {
				return this.sqlite.transaction(() => this.writeGroup(group, results, committed, nowMs)).immediate();
			} finally {
				if (foreignKeys) this.sqlite.pragma('foreign_keys = ON');
			}
		};
		try {
			if (this.syncWal) runs = write();
			else {
				this.sqlite.pragma('synchronous = FULL');
				try {
					runs = write();
				} finally {
					this.sqlite.pragma('synchronous = NORMAL');
				}
			}
		} catch (e) {
			if (e instanceof FastPathMiss) {
				this.slowOnce = true;
				return this.flushSoon();
			}
			const code = (e as { code?: string }).code;
			if (code === 'SQLITE_BUSY' || code === 'SQLITE_LOCKED') {
				// Another process holds the write lock beyond busy_timeout: keep the group, try again.
				this.stats.busyRetries++;
				return this.retryLater();
			}
			const message = `Storage failed: ${(e as Error).message}`;
			for (let i = 0; i < group.length; i++) results[i] = { ok: false, code: 'storage_error', message };
			committed.clear();
			this.lastUsedWrittenMs.clear();
			this.maxTimeMs.clear();
		}
		// Only a committed group moves the runs' latest times on (a failed or retried one is rolled back).
		for (const [runId, run] of runs) {
			if (run.ok) this.maxTimeMs.set(runId, run.maxTimeMs);
			else this.maxTimeMs.delete(runId);
		}
		this.slowOnce = false;
		this.queue.splice(0, take);
		this.queuedRows -= rows;
		this.stats.pendingRows = this.queuedRows;
		if (committed.size > 0) {
			this.stats.commits++;
			this.stats.lastGroupRows = rows;
			try {
				this.o.onCommit?.([...committed.values()]);
			} catch (e) {
				// The rows are durable; a failure downstream (reduction, live) must not fail the ingest.
				console.error('ingest: post-commit stage failed', e);
			}
		}
		const answer = (syncError: Error | null) => {
			// Committed but not known to be on disk: the sender must not drop them. It sends them again and
			// they come back as duplicates (already stored), which is the truth once the disk recovers.
			const failed: SubmissionResult | null = syncError && { ok: false, code: 'storage_error', message: `The readings could not be confirmed on disk (${syncError.message}); send them again.` };
			for (let i = 0; i < group.length; i++) group[i].done(failed && results[i].ok ? failed : results[i]);
		};
		if (this.syncWal && committed.size > 0) this.whenDurable(answer);
		else answer(null);
		if (this.queue.length > 0) {
			if (this.queuedRows >= this.o.maxRows || this.o.windowMs === 0) this.flushSoon();
			else this.timer = setTimeout(() => this.flush(), this.o.windowMs);
		} else if (this.drainWaiters.length > 0) {
			for (const w of this.drainWaiters.splice(0)) w();
		}
	}

	private writeGroup(group: Submission[], results: SubmissionResult[], committed: Map<number, CommittedRun>, nowMs: number): Map<number, GroupRun> {
		const { insert, insertMany, runState, maxTime, updateRun, touchToken } = this.statements;
		const runs = new Map<number, GroupRun>();
		// The run's state is read inside the write transaction: a run that stopped recording a moment
		// ago gets nothing more, however the readings were queued.
		for (const s of group) {
			if (!runs.has(s.runId)) {
				const row = runState.get(s.runId);
				const ok = row?.state === 'recording';
				// The run's latest time is read once per run (a scan of its readings) and then kept up to date.
				const maxTimeMs = !ok ? -Infinity : (this.maxTimeMs.get(s.runId) ?? maxTime.get(s.runId)?.t ?? -Infinity);
				runs.set(s.runId, { ok, state: row?.state ?? null, highestSeq: row?.highest_seq ?? -1, added: 0, maxTimeMs });
			}
		}
		for (let i = 0; i < group.length; i++) {
			const s = group[i];
			const run = runs.get(s.runId)!;
			if (!run.ok) {
				results[i] =
					run.state === null
						? { ok: false, code: 'run_not_found', message: `Run #${s.runId} does not exist.` }
						: { ok: false, code: 'run_not_recording', message: `Run #${s.runId} is ${run.state}, not recording.` };
				continue;
			}
			let entry = committed.get(s.runId);
			if (!entry) committed.set(s.runId, (entry = { runId: s.runId, stored: [], highestDurableSeq: run.highestSeq }));
			let stored = 0;
			let backwards = 0;
			// Fast path: a seq above the run's highest stored seq cannot be a duplicate, so such readings go in
			// 100 to a statement. Anything else takes the row-by-row INSERT OR IGNORE path, after the
			// fast rows so far are written (a repeated seq in the batch must meet its first copy).
			const fast: ValidReading[] = [];
			const flushFast = (all: boolean) => {
				let i = 0;
				for (; fast.length - i >= MULTI_ROWS; i += MULTI_ROWS) {
					const p = this.params;
					for (let k = 0; k < MULTI_ROWS; k++) {
						const r = fast[i + k];
						const o = k * 6;
						p[o] = s.runId;
						p[o + 1] = r.seq;
						p[o + 2] = r.timeMs;
						p[o + 3] = r.ratio;
						p[o + 4] = r.currentMilliAmp;
						p[o + 5] = r.channel;
					}
					if (insertMany.run(p).changes !== MULTI_ROWS) throw new FastPathMiss();
				}
				if (all) {
					for (; i < fast.length; i++) {
						const r = fast[i];
						if (insert.run(s.runId, r.seq, r.timeMs, r.ratio, r.currentMilliAmp, r.channel).changes !== 1) throw new FastPathMiss();
					}
					fast.length = 0;
				} else fast.splice(0, i);
			};
			for (const r of s.readings) {
				if (r.seq > run.highestSeq && !this.slowOnce) {
					fast.push(r);
					stored++;
					entry.stored.push(r);
					if (r.timeMs < run.maxTimeMs) backwards++;
					else run.maxTimeMs = r.timeMs;
					run.highestSeq = r.seq;
					if (fast.length >= MULTI_ROWS) flushFast(false);
					continue;
				}
				flushFast(true);
				if (insert.run(s.runId, r.seq, r.timeMs, r.ratio, r.currentMilliAmp, r.channel).changes === 1) {
					stored++;
					entry.stored.push(r);
					if (r.timeMs < run.maxTimeMs) backwards++;
					else run.maxTimeMs = r.timeMs;
					if (r.seq > run.highestSeq) run.highestSeq = r.seq;
				}
			}
			flushFast(true);
			run.added += stored;
			results[i] = { ok: true, accepted: stored, duplicates: s.readings.length - stored, highestDurableSeq: -1, timeBackwards: backwards };
			if (s.tokenId !== null && nowMs - (this.lastUsedWrittenMs.get(s.tokenId) ?? -Infinity) >= this.o.lastUsedIntervalMs) {
				touchToken.run(nowMs, s.tokenId);
				this.lastUsedWrittenMs.set(s.tokenId, nowMs);
			}
		}
		for (const [runId, run] of runs) {
			if (!run.ok) continue;
			// last_reading_at is the server's receipt time (what a silence alert needs), not the
			// instrument's timeMs, which a simulator may run faster than the wall clock.
			if (run.added > 0) updateRun.run(run.added, run.highestSeq, nowMs, runId);
			committed.get(runId)!.highestDurableSeq = run.highestSeq;
		}
		for (let i = 0; i < group.length; i++) {
			const r = results[i];
			if (r.ok) r.highestDurableSeq = runs.get(group[i].runId)!.highestSeq;
		}
		return runs;
	}
}

interface GroupRun {
	ok: boolean;
	state: string | null;
	highestSeq: number;
	added: number;
	maxTimeMs: number;
}
