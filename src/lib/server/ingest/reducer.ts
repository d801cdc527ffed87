// The downstream stage of the ingest: reduction through the metrology core and the plateau tracker,
// per recording run, fed from storage by a cursor over (run_id, seq).
//
// Why a tailer of the table rather than a hand-off of the committed rows: the stage can then run in
// a worker thread on its own connection (the other core), it can fall behind under a burst and catch
// up without an unbounded queue, and the rebuild after a restart is the same code path as normal
// operation (the cursor simply starts at -1). Readings are durable before this stage sees them.

import type SQLite from 'better-sqlite3';
import { createPlateauTracker, type PlateauTracker, type TrackerSnapshot } from '$lib/plateau';
import type { BenchSummary, DetectorState, LiveReading } from '$lib/live/protocol';
import { loadReductionContext, reduceForLive, type ReductionContext } from './reduce';

/** Coefficients or R_TPW may change during a run; the context is read again this often. */
const CONTEXT_TTL_MS = 60_000;
/** Rows per step of one run; runs take turns, so a long rebuild does not hold up the others. */
export const REDUCER_CHUNK = 2000;
/**
 * Share of one core the reducer may take while it has a backlog. A live bench makes a few readings a
 * second, so in normal use this never binds; in a burst (an instrument replaying a day of readings)
 * the reducer falls behind and catches up afterwards instead of starving the durable ingest path.
 */
export const REDUCER_DUTY_CYCLE = 0.35;
const BACKLOG_BUDGET_MS = 10;

/** Reduced readings in columns (typed arrays cross a thread boundary as a copy of memory, not objects). */
export interface ReducedColumns {
	seq: Float64Array;
	timeMs: Float64Array;
	ratio: Float64Array;
	currentMilliAmp: Float64Array;
	channel: Float64Array;
	resistanceOhm: Float64Array;
	w: Float64Array;
	t90Kelvin: Float64Array;
	deltaMilliKelvin: Float64Array;
	/** bit 0: timeBackwards, bit 1: reduction failed */
	flags: Uint8Array;
}

export interface ReducerUpdate {
	runId: number;
	columns: ReducedColumns;
	/** the last reduction failure's message in this update */
	problem: string | null;
	summary: BenchSummary;
}

export function toDetectorState(s: TrackerSnapshot | null, rebuilding: boolean): DetectorState | null {
	if (!s) {
		return rebuilding
			? { state: 'waiting', onPlateau: false, valueKelvin: null, slopeMilliKelvinPerHour: null, slopeStdErrMilliKelvinPerHour: null, noiseMilliKelvin: null, plateauStartS: null, plateauElapsedS: null, fraction: null, remainingS: null, selfHeatingMilliKelvin: null, readings: 0, rebuilding }
			: null;
	}
	return {
		state: s.state,
		onPlateau: s.onPlateau,
		valueKelvin: s.valueKelvin,
		slopeMilliKelvinPerHour: s.slopeMilliKelvinPerHour,
		slopeStdErrMilliKelvinPerHour: s.slopeStdErrMilliKelvinPerHour,
		noiseMilliKelvin: s.noiseMilliKelvin,
		plateauStartS: s.plateauStart,
		plateauElapsedS: s.plateauElapsedS,
		fraction: s.fraction,
		remainingS: s.remainingS,
		selfHeatingMilliKelvin: s.selfHeatingMilliKelvin,
		readings: s.readings,
		rebuilding
	};
}

/** Turns columns back into reading objects (only done for runs someone is watching). */
export function columnsToReadings(c: ReducedColumns, problem: string | null): LiveReading[] {
	const n = c.seq.length;
	const out: LiveReading[] = new Array(n);
	const num = (x: number) => (Number.isNaN(x) ? null : x);
	for (let i = 0; i < n; i++) {
		const r: LiveReading = {
			seq: c.seq[i],
			timeMs: c.timeMs[i],
			ratio: c.ratio[i],
			currentMilliAmp: c.currentMilliAmp[i],
			channel: c.channel[i],
			resistanceOhm: num(c.resistanceOhm[i]),
			w: num(c.w[i]),
			t90Kelvin: num(c.t90Kelvin[i]),
			deltaMilliKelvin: num(c.deltaMilliKelvin[i])
		};
		if (c.flags[i] & 1) r.timeBackwards = true;
		if (c.flags[i] & 2 && problem) r.problem = problem;
		out[i] = r;
	}
	return out;
}

interface RawRow {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel: number;
}

class RunState {
	ctx: ReductionContext;
	readonly tracker: PlateauTracker | null;
	cursorSeq = -1;
	/** the rebuild is done once the cursor reaches what was stored when the run was loaded */
	private readonly rebuildTargetSeq: number;
	private trackerLastTimeMs = -Infinity;
	private maxTimeMs = -Infinity;
	snapshot: TrackerSnapshot | null = null;
	latest: LiveReading | null = null;
	readingCount = 0;
	lastReadingAtMs: number | null = null;

	constructor(ctx: ReductionContext, highestSeq: number) {
		this.ctx = ctx;
		this.rebuildTargetSeq = highestSeq;
		this.tracker = ctx.basis === 'unavailable' ? null : createPlateauTracker({ kind: ctx.kind, expectedKelvin: ctx.expectedKelvin ?? undefined });
	}

	get rebuilding(): boolean {
		return this.cursorSeq < this.rebuildTargetSeq;
	}

	step(rows: RawRow[]): { columns: ReducedColumns; problem: string | null } {
		const n = rows.length;
		const c: ReducedColumns = {
			seq: new Float64Array(n),
			timeMs: new Float64Array(n),
			ratio: new Float64Array(n),
			currentMilliAmp: new Float64Array(n),
			channel: new Float64Array(n),
			resistanceOhm: new Float64Array(n),
			w: new Float64Array(n),
			t90Kelvin: new Float64Array(n),
			deltaMilliKelvin: new Float64Array(n),
			flags: new Uint8Array(n)
		};
		let problem: string | null = null;
		let live: LiveReading | null = null;
		for (let i = 0; i < n; i++) {
			const r = rows[i];
			this.cursorSeq = r.seq;
			// Same rule as the ingest's answer: earlier than a reading already had → flagged, kept out of the detector.
			const backwards = r.timeMs < this.maxTimeMs;
			if (!backwards) this.maxTimeMs = r.timeMs;
			live = reduceForLive(this.ctx, r, backwards);
			if (!backwards && this.tracker && live.t90Kelvin !== null && r.timeMs > this.trackerLastTimeMs) {
				this.trackerLastTimeMs = r.timeMs;
				this.snapshot = this.tracker.push(r.timeMs / 1000, live.t90Kelvin, r.currentMilliAmp);
			}
			c.seq[i] = r.seq;
			c.timeMs[i] = r.timeMs;
			c.ratio[i] = r.ratio;
			c.currentMilliAmp[i] = r.currentMilliAmp;
			c.channel[i] = r.channel;
			c.resistanceOhm[i] = live.resistanceOhm ?? NaN;
			c.w[i] = live.w ?? NaN;
			c.t90Kelvin[i] = live.t90Kelvin ?? NaN;
			c.deltaMilliKelvin[i] = live.deltaMilliKelvin ?? NaN;
			c.flags[i] = (backwards ? 1 : 0) | (live.problem ? 2 : 0);
			if (live.problem) problem = live.problem;
		}
		if (live) this.latest = live;
		return { columns: c, problem };
	}

	summary(): BenchSummary {
		return {
			benchId: String(this.ctx.benchId),
			benchName: this.ctx.benchName,
			runId: String(this.ctx.runId),
			fixedPoint: this.ctx.fixedPoint,
			kind: this.ctx.kind,
			reduction: this.ctx.basis,
			latest: this.latest,
			detector: toDetectorState(this.snapshot, this.rebuilding),
			readingCount: this.readingCount,
			lastReadingAtMs: this.lastReadingAtMs
		};
	}
}

export class Reducer {
	private readonly runs = new Map<number, RunState>();
	private readonly dirty = new Set<number>();
	private readonly backlogged = new Set<number>();
	private scheduled: NodeJS.Immediate | NodeJS.Timeout | null = null;
	/** no pump before this time (duty-cycle cap) */
	private restUntilMs = 0;
	private restTimer = false;
	private readonly rowsAfter: SQLite.Statement<[number, number, number], RawRow>;
	private readonly counts: SQLite.Statement<[number], { state: string; highest_seq: number; reading_count: number; last_reading_at: number | null }>;

	constructor(
		private readonly sqlite: SQLite.Database,
		private readonly emit: (update: ReducerUpdate) => void
	) {
		this.rowsAfter = sqlite.prepare('select seq, time_ms as timeMs, ratio, current_ma as currentMilliAmp, channel from reading where run_id = ? and seq > ? order by seq limit ?');
		this.counts = sqlite.prepare('select state, highest_seq, reading_count, last_reading_at from run where id = ?');
	}

	/** New readings are stored for the run (or it is recording and should be tracked). */
	notify(runId: number): void {
		this.dirty.add(runId);
		this.schedule();
	}

	private schedule(): void {
		let live = false;
		for (const id of this.dirty) if (!this.backlogged.has(id)) live = true;
		const waitMs = live ? 0 : this.restUntilMs - performance.now();
		if (this.scheduled) {
			// A resting backlog must not hold up fresh readings of a caught-up run.
			if (!(live && this.restTimer)) return;
			clearTimeout(this.scheduled as NodeJS.Timeout);
			this.scheduled = null;
		}
		this.restTimer = waitMs > 0;
		this.scheduled = waitMs > 0 ? setTimeout(() => this.pump(), waitMs) : setImmediate(() => this.pump());
	}

	drop(runId: number): void {
		this.runs.delete(runId);
		this.dirty.delete(runId);
	}

	/** Every run recording now, so detectors are rebuilt right after a restart. */
	loadRecording(): void {
		const rows = this.sqlite.prepare("select id from run where state = 'recording'").all() as { id: number }[];
		for (const r of rows) this.notify(r.id);
	}

	private state(runId: number): RunState | null {
		let st = this.runs.get(runId);
		const nowMs = Date.now();
		if (st && nowMs - st.ctx.loadedAtMs > CONTEXT_TTL_MS) {
			const fresh = loadReductionContext(this.sqlite, runId, nowMs);
			if (fresh) st.ctx = fresh;
		}
		if (st) return st;
		const ctx = loadReductionContext(this.sqlite, runId, nowMs);
		const counts = this.counts.get(runId);
		if (!ctx || !counts || counts.state !== 'recording') return null;
		st = new RunState(ctx, counts.highest_seq);
		this.runs.set(runId, st);
		return st;
	}

	/**
	 * Runs that are caught up (their last read came back short) go first and in full: that is the live
	 * path, a handful of readings each. Runs with a backlog (a rebuild, a burst) then take turns, one
	 * chunk each within a time budget, and only outside the duty-cycle rest.
	 */
	pump(): void {
		this.scheduled = null;
		const ids = [...this.dirty];
		for (const runId of ids) if (!this.backlogged.has(runId)) this.step(runId);
		if (performance.now() >= this.restUntilMs) {
			const backlogStartMs = performance.now();
			for (const runId of ids) {
				if (!this.backlogged.has(runId) || !this.dirty.has(runId)) continue;
				if (performance.now() - backlogStartMs > BACKLOG_BUDGET_MS) break;
				this.step(runId);
			}
			const busyMs = performance.now() - backlogStartMs;
			this.restUntilMs = performance.now() + (busyMs * (1 - REDUCER_DUTY_CYCLE)) / REDUCER_DUTY_CYCLE;
		}
		if (this.dirty.size > 0) this.schedule();
	}

	private step(runId: number): void {
		this.dirty.delete(runId);
		try {
			const st = this.state(runId);
			if (!st) {
				this.backlogged.delete(runId);
				return;
			}
			const rows = this.rowsAfter.all(runId, st.cursorSeq, REDUCER_CHUNK);
			if (rows.length === REDUCER_CHUNK) {
				this.backlogged.add(runId);
				this.dirty.add(runId);
			} else this.backlogged.delete(runId);
			const counts = this.counts.get(runId);
			if (counts && counts.state !== 'recording') {
				this.drop(runId);
				this.backlogged.delete(runId);
				return;
			}
			st.readingCount = counts?.reading_count ?? st.readingCount;
			st.lastReadingAtMs = counts?.last_reading_at ?? st.lastReadingAtMs;
			const { columns, problem } = st.step(rows);
			this.emit({ runId, columns, problem, summary: st.summary() });
		} catch (e) {
			console.error(`reducer: run ${runId}`, e);
		}
	}
}
