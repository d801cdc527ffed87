// The downstream stage of the ingest: reduction through the metrology core and the plateau tracker,
// per recording run.
//
// Its input is storage, read by a cursor over (run_id, seq), with a short cut for the live path: the
// writer hands over the rows of each commit (packed in a Float64Array, which crosses the thread
// boundary as memory, not objects), and a run that is caught up takes them from there instead of
// reading them back. Storage stays the source of truth: a run is rebuilt from it after a restart, and
// goes back to it whenever the hand-over cannot be trusted to be complete (not yet caught up, too far
// behind). Either way the stage runs in a worker thread on its own connection (the other core), can
// fall behind under a burst and catch up, and only ever sees readings that are already durable.

import type SQLite from 'better-sqlite3';
import { createPlateauTracker, type PlateauTracker, type TrackerSnapshot } from '$lib/plateau';
import type { BenchSummary, DetectorState, LiveReading } from '$lib/live/protocol';
import { emptyReduced, loadReductionContext, reduceInto, type ReductionContext } from './reduce';

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
/**
 * While rows are handed over faster than this (a replay or an import; fifty live benches make a few
 * hundred a second), the ingest is busy: backlogs then get only BUSY_DUTY_CYCLE, so the readings are
 * acknowledged first and reduced right after. Measured on the 2-core bench machine: the reduction of a
 * burst running beside it took about a fifth of the HTTP ingest's throughput at 0.35.
 */
export const BUSY_ROWS_PER_S = 20_000;
export const BUSY_DUTY_CYCLE = 0.05;
const BUSY_WINDOW_MS = 100;
/** the ingest counts as busy this long after the last window above BUSY_ROWS_PER_S */
const BUSY_HOLD_MS = 250;
const BACKLOG_BUDGET_MS = 10;
/**
 * More new rows than this for one run in one step is not a live bench (a few readings a second) but a
 * burst or a rebuild: such a run takes its turn under the duty cycle.
 */
export const BURST_ROWS = 200;
/** Handed-over rows kept per run before the hand-over is dropped and the run reads storage again. */
const HANDOFF_MAX_ROWS = 50_000;

/** Raw readings packed five numbers each: seq, timeMs, ratio, currentMilliAmp, channel. */
export const PACKED_STRIDE = 5;

type RawRow = { seq: number; timeMs: number; ratio: number; currentMilliAmp: number; channel: number };

export function packRows(rows: readonly RawRow[]): Float64Array {
	const out = new Float64Array(rows.length * PACKED_STRIDE);
	packRowsInto(out, 0, rows);
	return out;
}

/** Writes rows in the packed layout into `out` from offset `o`; returns the offset after them. */
export function packRowsInto(out: Float64Array, o: number, rows: readonly RawRow[]): number {
	for (const r of rows) {
		out[o] = r.seq;
		out[o + 1] = r.timeMs;
		out[o + 2] = r.ratio;
		out[o + 3] = r.currentMilliAmp;
		out[o + 4] = r.channel;
		o += PACKED_STRIDE;
	}
	return o;
}

/**
 * The handed-over rows with seq above afterSeq, in seq order, at most maxRows; the rest stays for later
 * (as chunks, most often views into the ones given).
 */
export function handoffAfter(chunks: readonly Float64Array[], afterSeq: number, maxRows: number): { rows: Float64Array; rest: Float64Array[] } {
	const S = PACKED_STRIDE;
	// The usual case: one commit after another, every row new and in order. Only the rows taken are
	// copied, so a run with a long hand-over (a burst under the duty cycle) costs per step what it takes,
	// not what it holds.
	let prev = afterSeq;
	let inOrder = true;
	let n = 0;
	for (const c of chunks) {
		for (let i = 0; i < c.length; i += S) {
			if (c[i] <= prev) {
				inOrder = false;
				break;
			}
			prev = c[i];
		}
		if (!inOrder) break;
		n += c.length / S;
	}
	if (inOrder) {
		if (chunks.length === 1 && n <= maxRows) return { rows: chunks[0], rest: [] };
		const rows = new Float64Array(Math.min(n, maxRows) * S);
		let o = 0;
		let k = 0;
		const rest: Float64Array[] = [];
		for (; k < chunks.length && o < rows.length; k++) {
			const c = chunks[k];
			const need = rows.length - o;
			if (c.length <= need) {
				rows.set(c, o);
				o += c.length;
			} else {
				rows.set(c.subarray(0, need), o);
				o += need;
				rest.push(c.subarray(need));
			}
		}
		for (; k < chunks.length; k++) rest.push(chunks[k]);
		return { rows, rest };
	}
	// A resend can bring an older seq after a newer one; the cursor takes them in seq order, as a read would.
	let total = 0;
	for (const c of chunks) total += c.length;
	const all = new Float64Array(total);
	let o = 0;
	for (const c of chunks) {
		all.set(c, o);
		o += c.length;
	}
	const keep: number[] = [];
	for (let i = 0; i < total / S; i++) if (all[i * S] > afterSeq) keep.push(i);
	keep.sort((a, b) => all[a * S] - all[b * S]);
	const pick = (from: number, to: number) => {
		const out = new Float64Array((to - from) * S);
		for (let k = from; k < to; k++) for (let j = 0; j < S; j++) out[(k - from) * S + j] = all[keep[k] * S + j];
		return out;
	};
	const take = Math.min(keep.length, maxRows);
	return { rows: pick(0, take), rest: take < keep.length ? [pick(take, keep.length)] : [] };
}

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

const num = (x: number) => (Number.isNaN(x) ? null : x);

/** Row i of the columns as a reading object. */
function readingAt(c: ReducedColumns, i: number, problem: string | null): LiveReading {
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
	return r;
}

/** Turns columns back into reading objects (only done for runs someone is watching). */
export function columnsToReadings(c: ReducedColumns, problem: string | null): LiveReading[] {
	const out: LiveReading[] = new Array(c.seq.length);
	for (let i = 0; i < out.length; i++) out[i] = readingAt(c, i, problem);
	return out;
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
	/** the cursor reads storage (rebuilding, or the hand-over was dropped) until a read comes back short */
	fromStorage = true;
	/** rows the writer handed over since the last step, in commit order */
	handoff: Float64Array[] = [];
	handoffRows = 0;
	private readonly scratch = emptyReduced();

	constructor(ctx: ReductionContext, highestSeq: number) {
		this.ctx = ctx;
		this.rebuildTargetSeq = highestSeq;
		this.tracker = ctx.basis === 'unavailable' ? null : createPlateauTracker({ kind: ctx.kind, expectedKelvin: ctx.expectedKelvin ?? undefined });
	}

	get rebuilding(): boolean {
		return this.cursorSeq < this.rebuildTargetSeq;
	}

	/** Reduces packed rows (seq order, all above the cursor) and feeds the tracker. */
	step(rows: Float64Array): { columns: ReducedColumns; problem: string | null } {
		const n = rows.length / PACKED_STRIDE;
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
		const v = this.scratch;
		for (let i = 0; i < n; i++) {
			const o = i * PACKED_STRIDE;
			const seq = rows[o];
			const timeMs = rows[o + 1];
			const ratio = rows[o + 2];
			const currentMilliAmp = rows[o + 3];
			this.cursorSeq = seq;
			// Same rule as the ingest's answer: earlier than a reading already had → flagged, kept out of the detector.
			const backwards = timeMs < this.maxTimeMs;
			if (!backwards) this.maxTimeMs = timeMs;
			reduceInto(this.ctx, ratio, timeMs, v);
			if (!backwards && this.tracker && v.t90Kelvin !== null && timeMs > this.trackerLastTimeMs) {
				this.trackerLastTimeMs = timeMs;
				this.snapshot = this.tracker.push(timeMs / 1000, v.t90Kelvin, currentMilliAmp);
			}
			c.seq[i] = seq;
			c.timeMs[i] = timeMs;
			c.ratio[i] = ratio;
			c.currentMilliAmp[i] = currentMilliAmp;
			c.channel[i] = rows[o + 4];
			c.resistanceOhm[i] = v.resistanceOhm ?? NaN;
			c.w[i] = v.w ?? NaN;
			c.t90Kelvin[i] = v.t90Kelvin ?? NaN;
			c.deltaMilliKelvin[i] = v.deltaMilliKelvin ?? NaN;
			c.flags[i] = (backwards ? 1 : 0) | (v.problem ? 2 : 0);
			if (v.problem) problem = v.problem;
		}
		// The newest reading as an object, for the bench summary (one per step, not per reading).
		if (n > 0) this.latest = readingAt(c, n - 1, v.problem);
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
	/** rows handed over in the current BUSY_WINDOW_MS window, and until when the ingest counts as busy */
	private arrivals = { fromMs: 0, rows: 0 };
	private busyUntilMs = 0;
	private readonly rowsAfter: SQLite.Statement<[number, number, number], number[]>;
	private readonly counts: SQLite.Statement<[number], { state: string; highest_seq: number; reading_count: number; last_reading_at: number | null }>;

	constructor(
		private readonly sqlite: SQLite.Database,
		private readonly emit: (update: ReducerUpdate) => void
	) {
		this.rowsAfter = sqlite.prepare<[number, number, number], number[]>('select seq, time_ms, ratio, current_ma, channel from reading where run_id = ? and seq > ? order by seq limit ?').raw(true);
		this.counts = sqlite.prepare('select state, highest_seq, reading_count, last_reading_at from run where id = ?');
	}

	/**
	 * New readings are stored for the run (or it is recording and should be tracked). `rows`: what the
	 * commit stored for it, packed (packRows), kept if the run is caught up and read from storage if not.
	 */
	notify(runId: number, rows?: Float64Array): void {
		if (rows) this.countArrivals(rows.length / PACKED_STRIDE);
		const st = this.runs.get(runId);
		if (st && !rows) {
			// Stored by someone else than the writer (or no rows given): only storage knows what is new.
			st.fromStorage = true;
			st.handoff = [];
			st.handoffRows = 0;
		} else if (st && rows && !st.fromStorage) {
			if (st.handoffRows + rows.length / PACKED_STRIDE > HANDOFF_MAX_ROWS) {
				st.handoff = [];
				st.handoffRows = 0;
				st.fromStorage = true;
			} else {
				st.handoff.push(rows);
				st.handoffRows += rows.length / PACKED_STRIDE;
			}
			// More than a live bench makes between two steps (a batch of a replay): a backlog from the start,
			// not a step on the live path that the duty cycle does not hold back.
			if (st.handoffRows > BURST_ROWS) this.backlogged.add(runId);
		}
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

	/** Whether readings are arriving faster than live benches make them (see BUSY_ROWS_PER_S). */
	ingestBusy(nowMs = performance.now()): boolean {
		return nowMs < this.busyUntilMs;
	}

	private countArrivals(rows: number, nowMs = performance.now()): void {
		if (nowMs - this.arrivals.fromMs >= BUSY_WINDOW_MS) this.arrivals = { fromMs: nowMs, rows: 0 };
		this.arrivals.rows += rows;
		if (this.arrivals.rows > (BUSY_ROWS_PER_S * BUSY_WINDOW_MS) / 1000) this.busyUntilMs = nowMs + BUSY_HOLD_MS;
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
			const duty = this.ingestBusy() ? BUSY_DUTY_CYCLE : REDUCER_DUTY_CYCLE;
			this.restUntilMs = performance.now() + (busyMs * (1 - duty)) / duty;
		}
		if (this.dirty.size > 0) this.schedule();
	}

	/** The next rows above the run's cursor: from the hand-over when it is complete, else from storage. */
	private take(st: RunState, runId: number): Float64Array {
		if (!st.fromStorage) {
			const { rows, rest } = handoffAfter(st.handoff, st.cursorSeq, REDUCER_CHUNK);
			st.handoff = rest;
			let left = 0;
			for (const c of rest) left += c.length / PACKED_STRIDE;
			st.handoffRows = left;
			return rows;
		}
		const read = this.rowsAfter.all(runId, st.cursorSeq, REDUCER_CHUNK);
		const rows = new Float64Array(read.length * PACKED_STRIDE);
		for (let i = 0; i < read.length; i++) rows.set(read[i], i * PACKED_STRIDE);
		if (read.length < REDUCER_CHUNK) {
			// Everything stored is in this read, including what any hand-over received so far holds (a
			// commit is handed over after it happened): from here on the hand-over is complete.
			st.fromStorage = false;
			st.handoff = [];
			st.handoffRows = 0;
		}
		return rows;
	}

	private step(runId: number): void {
		this.dirty.delete(runId);
		try {
			const st = this.state(runId);
			if (!st) {
				this.backlogged.delete(runId);
				return;
			}
			const rows = this.take(st, runId);
			const n = rows.length / PACKED_STRIDE;
			const more = st.fromStorage ? n === REDUCER_CHUNK : st.handoffRows > 0;
			if (more) this.dirty.add(runId);
			if (more || n > BURST_ROWS) this.backlogged.add(runId);
			else this.backlogged.delete(runId);
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
