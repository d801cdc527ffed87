// The process-wide ingest: one writer, the downstream reducer, the live hub and the per-token rate
// limiter. Shared through globalThis because Vite's dev server may load this module more than once.

import type SQLite from 'better-sqlite3';
import type { BenchSummary, DetectorState } from '$lib/live/protocol';
import { appDatabase } from '../db';
import { RateLimiter } from '../rate-limit';
import { LiveHub } from '../live/hub';
import { createDownstream, type Downstream } from './downstream';
import { RATE_BURST, RATE_REQUESTS_PER_S } from './limits';
import { columnsToReadings, type ReducerUpdate } from './reducer';
import type { ReadingWriter } from './writer';
import { createReadingWriter } from './writer-thread';
import { startAlerts } from '../alerts/runtime';
import { analyseInBackground } from '../analysis/background';

/** Something holding a socket for a token or run, closed when either stops being valid. */
export interface IngestConnection {
	tokenId: number;
	runId: number;
	close(code: number, errorCode: string, message: string): void;
}

/**
 * What the main thread keeps per recording run: that an instrument is sending to it (so the sweep
 * notices when it stops recording) and the newest summary from the reducer.
 */
export class RecordingRuns {
	private readonly sending = new Set<number>();
	readonly summaries = new Map<number, BenchSummary>();
	onPrepare: ((runId: number) => void) | null = null;

	constructor(private readonly sqlite: SQLite.Database) {}

	/** Called before an instrument's submission to the run. */
	prepare(runId: number): void {
		this.onPrepare?.(runId);
		this.sending.add(runId);
	}

	known(): number[] {
		return [...new Set([...this.sending, ...this.summaries.keys()])];
	}

	forget(runId: number): void {
		this.sending.delete(runId);
		this.summaries.delete(runId);
	}

	detector(runId: number): DetectorState | null {
		return this.summaries.get(runId)?.detector ?? null;
	}

	/** The overview: every recording run, with the reducer's figures where it has any. */
	overview(): BenchSummary[] {
		const rows = this.sqlite
			.prepare("select run.id, run.bench_id, b.name, run.fixed_point, run.kind, run.reading_count, run.last_reading_at from run join bench b on b.id = run.bench_id where run.state = 'recording' order by b.name")
			.all() as { id: number; bench_id: number; name: string; fixed_point: string; kind: string; reading_count: number; last_reading_at: number | null }[];
		return rows.map(
			(r) =>
				this.summaries.get(r.id) ?? {
					benchId: String(r.bench_id),
					benchName: r.name,
					runId: String(r.id),
					fixedPoint: r.fixed_point,
					kind: r.kind,
					reduction: 'calibrated',
					latest: null,
					detector: null,
					readingCount: r.reading_count,
					lastReadingAtMs: r.last_reading_at
				}
		);
	}
}

export interface IngestService {
	sqlite: SQLite.Database;
	writer: ReadingWriter;
	runs: RecordingRuns;
	downstream: Downstream;
	hub: LiveHub;
	limiter: RateLimiter;
	connections: Set<IngestConnection>;
	/** Called with every reducer update after the hub (the alert engine); must be cheap and not throw. */
	observers: Set<(u: ReducerUpdate) => void>;
	/** Run at shutdown (the alert engine's timers and the mail outbox). */
	closers: (() => void)[];
	/** Drops runs that stopped recording (finished by a page, a script, another process). */
	sweep(): void;
	shutdown(): Promise<void>;
}

const KEY = Symbol.for('stillpoint.ingest');
type WithIngest = typeof globalThis & { [KEY]?: IngestService; [key: symbol]: unknown };
const SWEEP_MS = 2000;

export function createIngestService(sqlite: SQLite.Database, dbPath: string, opts: { inlineReducer?: boolean } = {}): IngestService {
	const hub = new LiveHub();
	const connections = new Set<IngestConnection>();
	const observers = new Set<(u: ReducerUpdate) => void>();
	const runs = new RecordingRuns(sqlite);
	const ended = new Set<number>();
	const onUpdate = (u: ReducerUpdate) => {
		if (ended.has(u.runId)) return; // a late update from the reducer for a run that has stopped
		runs.summaries.set(u.runId, u.summary);
		// Reading objects are made only for runs somebody watches.
		if (hub.watching(u.runId)) hub.publishRun(u.runId, u.columns.seq.length > 0 ? columnsToReadings(u.columns, u.problem) : [], u.summary.detector);
		hub.publishBench(u.summary);
		for (const o of observers) o(u);
	};
	const downstream = createDownstream({ sqlite, dbPath, onUpdate, inline: opts.inlineReducer });
	const writer = createReadingWriter({
		sqlite,
		dbPath,
		onCommitRows: (runId, rows) => downstream.notify(runId, rows),
		// Where both run on threads, the committed rows go from the writer to the reducer directly.
		reducerPort: () => downstream.writerPort(),
		// A writer thread that died may have committed rows it never handed on: storage has them.
		onRestart: () => {
			for (const id of runs.known()) downstream.notify(id);
		}
	});
	downstream.onRestart = () => {
		const port = downstream.writerPort();
		if (port) writer.useReducerPort?.(port);
	};
	// A run (re)started after it ended in this process is a new recording: forget that it ended.
	runs.onPrepare = (runId) => ended.delete(runId);
	const limiter = new RateLimiter(RATE_BURST, RATE_REQUESTS_PER_S);
	const stateOf = (ids: number[]) =>
		new Map((sqlite.prepare(`select id, state from run where id in (${ids.map(() => '?').join(',')})`).all(...ids) as { id: number; state: string }[]).map((r) => [r.id, r.state]));
	const service: IngestService = {
		sqlite,
		writer,
		runs,
		downstream,
		hub,
		limiter,
		connections,
		observers,
		closers: [],
		sweep() {
			const ids = runs.known();
			if (ids.length === 0) return;
			const states = stateOf(ids);
			for (const id of ids) {
				const state = states.get(id) ?? 'deleted';
				if (state === 'recording') continue;
				runs.forget(id);
				ended.add(id);
				downstream.drop(id);
				hub.runEnded(id, state);
				// The final analysis starts now, off the main thread, so the run page finds it ready.
				if (state === 'finished') void analyseInBackground(sqlite, dbPath, id);
				for (const c of connections) if (c.runId === id) c.close(4403, 'run_not_recording', `Run ${id} is ${state}, not recording.`);
			}
		},
		async shutdown() {
			clearInterval(timer);
			for (const close of service.closers) close();
			await writer.close();
			await downstream.close();
			hub.close();
		}
	};
	const timer = setInterval(() => {
		try {
			service.sweep();
		} catch (e) {
			console.error('ingest: sweep failed', e);
		}
	}, SWEEP_MS);
	timer.unref();
	return service;
}

/** Where the ingest's writer and reducer run, once the ingest has started in this process (for /api/v1/health). */
export function ingestModes(): { writer: 'thread' | 'inline'; reducer: 'worker' | 'inline' } | null {
	const svc = (globalThis as WithIngest)[KEY];
	return svc ? { writer: svc.writer.mode, reducer: svc.downstream.mode } : null;
}

/** The ingest of this process, made on first use on the app database. */
export function ingestService(): IngestService {
	const g = globalThis as WithIngest;
	if (!g[KEY]) {
		const { sqlite, path } = appDatabase();
		const service = createIngestService(sqlite, path);
		g[KEY] = service;
		// Alert rules on every reducer update, a tick for silence and escalation, the e-mail outbox.
		startAlerts(service);
		// revokeBenchToken (src/lib/server/tokens) calls this to close the token's open streams at once.
		g[Symbol.for('stillpoint.tokenRevoked')] = (tokenId: number) => {
			for (const c of service.connections) if (c.tokenId === tokenId) c.close(4401, 'invalid_token', 'This bench token has been revoked.');
		};
	}
	return g[KEY]!;
}
