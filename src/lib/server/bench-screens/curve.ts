// The run chart's readings for a time range, reduced on the server (GET /runs/{id}/curve).
//
// A long run (10^6 readings) is never sent whole. Three ways to answer, all from SQLite:
// - `raw`: the range holds few readings (≤ 2 × points): every one, reduced.
// - `minmax`: per seq bucket the lowest and highest bridge ratio, read by primary-key range queries
//   (no sort, about 0.3 s for 10^6 rows here). T90, W and ΔT are monotonic in the ratio for one R_TPW
//   and one resistor temperature, so reducing the two extremes gives the bucket's extremes exactly;
//   spikes survive. Buckets never straddle a change of the R_TPW nearest in time.
// - `sampled`: one reading every n-th seq by index seeks (milliseconds whatever the run's length),
//   for a first draw while the min/max answer is on its way.
import type SQLite from 'better-sqlite3';
import { loadReductionContext, reduceForLive, type ReductionContext } from '../ingest/reduce';
import type { CurveData, CurveDetail } from '$lib/components/live/series';

export const MAX_POINTS = 4000;

interface Row {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
}

const round = (v: number | null, digits: number) => (v === null ? null : Number(v.toFixed(digits)));

function statements(sqlite: SQLite.Database) {
	return {
		bounds: sqlite.prepare('select min(seq) as lo, max(seq) as hi from reading where run_id = ?'),
		firstFrom: sqlite.prepare('select seq, time_ms as timeMs from reading where run_id = ? and seq >= ? order by seq limit 1'),
		rows: sqlite.prepare('select seq, time_ms as timeMs, ratio, current_ma as currentMilliAmp from reading where run_id = ? and seq >= ? and seq <= ? order by seq'),
		bucket: sqlite.prepare(
			'select min(ratio) as lo, max(ratio) as hi, min(current_ma) as iLo, max(current_ma) as iHi, min(time_ms) as t0, max(time_ms) as t1, count(*) as n from reading where run_id = ? and seq >= ? and seq < ?'
		)
	};
}

/** First seq whose time is ≥ timeMs (binary search on seq; times rise with seq apart from rare backward stamps). */
function seqAtTime(st: ReturnType<typeof statements>, runId: number, lo: number, hi: number, timeMs: number): number {
	let a = lo;
	let b = hi + 1;
	while (a < b) {
		const mid = Math.floor((a + b) / 2);
		const row = st.firstFrom.get(runId, mid) as { seq: number; timeMs: number } | undefined;
		if (!row) b = mid;
		else if (row.timeMs < timeMs) a = row.seq + 1;
		else b = mid;
	}
	return a;
}

function reduce(ctx: ReductionContext, r: Row) {
	const red = reduceForLive(ctx, { seq: r.seq, timeMs: r.timeMs, ratio: r.ratio, currentMilliAmp: r.currentMilliAmp, channel: 0 }, false);
	return { d: round(red.deltaMilliKelvin, 5), w: round(red.w, 10), k: round(red.t90Kelvin, 7) };
}

/** Seq boundaries inside [lo, hi] where the R_TPW nearest in time changes (buckets must not straddle them). */
function rTpwBreaks(ctx: ReductionContext, st: ReturnType<typeof statements>, runId: number, lo: number, hi: number): number[] {
	const h = ctx.rTpwHistory;
	const out: number[] = [];
	for (let i = 0; i + 1 < h.length; i++) {
		const mid = Math.floor((h[i].timeMs + h[i + 1].timeMs) / 2) + 1;
		const s = seqAtTime(st, runId, lo, hi, mid);
		if (s > lo && s <= hi) out.push(s);
	}
	return out;
}

export interface CurveQuery {
	fromMs?: number;
	toMs?: number;
	points?: number;
	sampled?: boolean;
}

export function runCurve(sqlite: SQLite.Database, runId: number, q: CurveQuery = {}): CurveData | null {
	const ctx = loadReductionContext(sqlite, runId);
	if (!ctx) return null;
	const st = statements(sqlite);
	const points = Math.max(10, Math.min(MAX_POINTS, Math.floor(q.points ?? 1500)));
	const b = st.bounds.get(runId) as { lo: number | null; hi: number | null };
	const out: CurveData = { runId, detail: 'raw', fromMs: q.fromMs ?? null, toMs: q.toMs ?? null, throughSeq: b.hi ?? -1, readings: 0, t: [], d: [], w: [], k: [], r: [], i: [] };
	if (b.lo === null || b.hi === null) return out;
	const lo = q.fromMs === undefined ? b.lo : seqAtTime(st, runId, b.lo, b.hi, q.fromMs);
	const hi = q.toMs === undefined ? b.hi : seqAtTime(st, runId, b.lo, b.hi, q.toMs + 1) - 1;
	if (hi < lo) return out;
	const span = hi - lo + 1;
	out.readings = span;
	const push = (timeMs: number, ratio: number, currentMilliAmp: number, red: { d: number | null; w: number | null; k: number | null }) => {
		out.t.push(timeMs);
		out.r.push(ratio);
		out.i.push(currentMilliAmp);
		out.d.push(red.d);
		out.w.push(red.w);
		out.k.push(red.k);
	};
	let detail: CurveDetail;
	if (span <= points * 2) {
		detail = 'raw';
		let last = -Infinity;
		for (const r of st.rows.all(runId, lo, hi) as Row[]) {
			if (r.timeMs < last) continue; // stamped earlier than a reading already had: stored, not drawn
			last = r.timeMs;
			push(r.timeMs, r.ratio, r.currentMilliAmp, reduce(ctx, r));
		}
	} else if (q.sampled) {
		detail = 'sampled';
		const step = span / points;
		let last = -Infinity;
		for (let j = 0; j < points; j++) {
			const r = st.firstFrom.get(runId, Math.floor(lo + j * step)) as { seq: number; timeMs: number } | undefined;
			if (!r || r.seq > hi || r.timeMs <= last) continue;
			const full = st.rows.get(runId, r.seq, r.seq) as Row;
			last = full.timeMs;
			push(full.timeMs, full.ratio, full.currentMilliAmp, reduce(ctx, full));
		}
	} else {
		detail = 'minmax';
		const breaks = [...rTpwBreaks(ctx, st, runId, lo, hi), hi + 1];
		const step = Math.max(1, Math.ceil(span / points));
		let from = lo;
		for (const end of breaks) {
			for (let s = from; s < end; s += step) {
				const e = Math.min(end, s + step);
				const g = st.bucket.get(runId, s, e) as { lo: number | null; hi: number; iLo: number; iHi: number; t0: number; t1: number; n: number };
				if (!g.n || g.lo === null) continue;
				// Both extremes reduced at the bucket's middle time (the R_TPW is the same across it).
				const mid = Math.round((g.t0 + g.t1) / 2);
				const low = reduce(ctx, { seq: s, timeMs: mid, ratio: g.lo, currentMilliAmp: g.iLo });
				if (g.n === 1 || g.hi === g.lo) {
					push(mid, g.lo, g.iLo, low);
					continue;
				}
				const high = reduce(ctx, { seq: s, timeMs: mid, ratio: g.hi, currentMilliAmp: g.iHi });
				const third = Math.max(1, Math.round((g.t1 - g.t0) / 3));
				push(g.t0 + third, g.lo, g.iLo, low);
				push(g.t1 - third > g.t0 + third ? g.t1 - third : g.t0 + third + 1, g.hi, g.iHi, high);
			}
			from = end;
		}
	}
	out.detail = detail;
	return out;
}

/** A tile's trace: the last `windowMs` of a recording run, a few hundred min/max points. */
export function recentTrace(sqlite: SQLite.Database, runId: number, windowMs = 2 * 3_600_000, points = 120): { t: number; v: number }[] {
	// the instrument's own clock: the newest reading's stamp, not the time it arrived
	const last = sqlite.prepare('select time_ms as t from reading where run_id = ? order by seq desc limit 1').get(runId) as { t: number } | undefined;
	if (!last) return [];
	const c = runCurve(sqlite, runId, { fromMs: last.t - windowMs, points });
	if (!c) return [];
	const out: { t: number; v: number }[] = [];
	for (let j = 0; j < c.t.length; j++) {
		const v = c.d[j];
		if (v !== null) out.push({ t: c.t[j], v });
	}
	return out;
}
