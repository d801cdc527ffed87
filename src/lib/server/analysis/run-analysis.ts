import type SQLite from 'better-sqlite3';
import { ratioFromTemperature, referenceRatio } from '../../metrology/index';
import { analyseRun, type RunAnalysis, type Sample } from '../../plateau/index';
import { loadReductionContext, reduceForLive, type ReductionContext } from '../ingest/reduce';
import type { StoredAnalysisView } from '../../components/run/analysis-view';

/**
 * A stored run reduced and analysed: what the run page, review, comparison and calibration read. The
 * page's view of it (StoredAnalysisView: what the analysis endpoint sends) plus the cache bookkeeping.
 */
export interface StoredRunAnalysis extends StoredAnalysisView {
	/** what the cache was computed from; a new reading, R_TPW check or calibration changes it */
	key: string;
	basis: ReductionContext['basis'];
	computedAtMs: number;
}

const SCHEMA_VERSION = 1;

function cacheKey(sqlite: SQLite.Database, runId: number): string | null {
	const row = sqlite
		.prepare(
			`select run.reading_count as n, run.highest_seq as hi, run.sensor_depth_m as depth, run.gas_pressure_pa as p, cell.purity_percent as purity,
			        (select max(id) from calibration where thermometer_id = run.thermometer_id and status = 'current') as cal,
			        (select count(*) || ':' || coalesce(max(id), 0) from thermometer_rtpw where thermometer_id = run.thermometer_id) as rtpw
			   from run join cell on cell.id = run.cell_id where run.id = ?`
		)
		.get(runId) as { n: number; hi: number; depth: number; p: number; purity: number | null; cal: number | null; rtpw: string } | undefined;
	return row ? `v${SCHEMA_VERSION}|${row.n}|${row.hi}|${row.depth}|${row.p}|${row.purity}|${row.cal}|${row.rtpw}` : null;
}

/** Reduces every stored reading of the run to kelvin (readings that cannot be reduced are left out). */
export function runSamples(sqlite: SQLite.Database, ctx: ReductionContext): { samples: Sample[]; t0Ms: number | null } {
	const rows = sqlite.prepare('select seq, time_ms, ratio, current_ma, channel from reading where run_id = ? order by seq').iterate(ctx.runId) as IterableIterator<{ seq: number; time_ms: number; ratio: number; current_ma: number; channel: number }>;
	const samples: Sample[] = [];
	let t0Ms: number | null = null;
	let lastMs = -Infinity;
	for (const r of rows) {
		// A reading stamped earlier than one already seen is kept in storage but not analysed (protocol rule).
		if (r.time_ms < lastMs) continue;
		lastMs = r.time_ms;
		const red = reduceForLive(ctx, { seq: r.seq, timeMs: r.time_ms, ratio: r.ratio, currentMilliAmp: r.current_ma, channel: r.channel }, false);
		if (red.t90Kelvin === null) continue;
		t0Ms ??= r.time_ms;
		samples.push({ t: (r.time_ms - t0Ms) / 1000, kelvin: red.t90Kelvin, currentMilliAmp: r.current_ma });
	}
	return { samples, t0Ms };
}

/** What the final analysis needs to know of a run and its cell, as stored. */
export interface RunAnalysisFacts {
	kind: 'melt' | 'freeze' | 'triple-point';
	fixed_point: ReductionContext['fixedPoint'];
	sensor_depth_m: number;
	gas_pressure_pa: number;
	purity_percent: number | null;
}

/** The final analysis of reduced samples with the run's own settings (cell depth, gas pressure, purity). */
export function analyseStoredRun(samples: Sample[], run: RunAnalysisFacts): RunAnalysis {
	return analyseRun(samples, {
		kind: run.kind,
		point: run.fixed_point,
		depthMetre: run.sensor_depth_m,
		pressurePa: run.gas_pressure_pa,
		purityPercent: run.purity_percent ?? undefined
	});
}

function compute(sqlite: SQLite.Database, runId: number, key: string): StoredRunAnalysis | null {
	const ctx = loadReductionContext(sqlite, runId);
	if (!ctx) return null;
	const run = sqlite.prepare('select run.kind, run.fixed_point, run.sensor_depth_m, run.gas_pressure_pa, run.reading_count, cell.purity_percent from run join cell on cell.id = run.cell_id where run.id = ?').get(runId) as RunAnalysisFacts & { reading_count: number };
	const base = { runId, key, basis: ctx.basis, subrange: ctx.subrange, readingCount: run.reading_count, computedAtMs: Date.now() };
	if (ctx.basis === 'unavailable') return { ...base, t0Ms: null, analysis: null, wAtPoint: null, problem: ctx.problem };
	const { samples, t0Ms } = runSamples(sqlite, ctx);
	if (samples.length < 10) return { ...base, t0Ms, analysis: null, wAtPoint: null, problem: 'too few readings to analyse' };
	const analysis = analyseStoredRun(samples, run);
	let wAtPoint: number | null = null;
	if (analysis.result) {
		const t = analysis.result.t90Kelvin;
		// Invert the same reduction: with a calibration through its deviation function, without one W = W_r.
		wAtPoint = ctx.basis === 'calibrated' && ctx.subrange && ctx.coefficients ? ratioFromTemperature(t, ctx.subrange, ctx.coefficients) : referenceRatio(t);
	}
	return { ...base, t0Ms, analysis, wAtPoint, problem: analysis.plateau ? null : 'no plateau found' };
}

/** The cached analysis if it is current; 'stale' when it must be computed; null: no such run. */
export function cachedRunAnalysis(sqlite: SQLite.Database, runId: number): StoredRunAnalysis | 'stale' | null {
	const key = cacheKey(sqlite, runId);
	if (!key) return null;
	const cached = sqlite.prepare('select analysis_json from run where id = ?').get(runId) as { analysis_json: string | null };
	if (cached.analysis_json) {
		try {
			const parsed = JSON.parse(cached.analysis_json) as StoredRunAnalysis;
			if (parsed.key === key) return parsed;
		} catch {
			/* stale */
		}
	}
	return 'stale';
}

/** Computes the analysis from storage (no write: a read-only connection in a worker may call it). */
export function computeRunAnalysis(sqlite: SQLite.Database, runId: number): StoredRunAnalysis | null {
	const key = cacheKey(sqlite, runId);
	return key ? compute(sqlite, runId, key) : null;
}

/** Caches a computed analysis, unless the run has changed since it was computed. */
export function saveRunAnalysis(sqlite: SQLite.Database, a: StoredRunAnalysis): boolean {
	if (cacheKey(sqlite, a.runId) !== a.key) return false;
	sqlite.prepare('update run set analysis_json = ? where id = ?').run(JSON.stringify(a), a.runId);
	return true;
}

/**
 * The run's analysis, from the cache in run.analysis_json when nothing it depends on has changed,
 * otherwise computed now and cached. Raw readings stay the truth; this is only a cache.
 */
export function storedRunAnalysis(sqlite: SQLite.Database, runId: number): StoredRunAnalysis | null {
	const cached = cachedRunAnalysis(sqlite, runId);
	if (cached !== 'stale') return cached;
	const fresh = computeRunAnalysis(sqlite, runId);
	if (fresh) saveRunAnalysis(sqlite, fresh);
	return fresh;
}

/** Min/max per time bucket, so a long run draws in a few thousand points without losing its spikes. */
export function decimatedCurve(samples: Sample[], buckets = 1500): { t: number; kelvin: number }[] {
	if (samples.length <= buckets * 2) return samples.map((s) => ({ t: s.t, kelvin: s.kelvin }));
	const out: { t: number; kelvin: number }[] = [];
	const per = samples.length / buckets;
	for (let b = 0; b < buckets; b++) {
		const from = Math.floor(b * per);
		const to = Math.min(samples.length, Math.floor((b + 1) * per));
		let lo = samples[from];
		let hi = samples[from];
		for (let i = from + 1; i < to; i++) {
			if (samples[i].kelvin < lo.kelvin) lo = samples[i];
			if (samples[i].kelvin > hi.kelvin) hi = samples[i];
		}
		const [a, c] = lo.t <= hi.t ? [lo, hi] : [hi, lo];
		out.push({ t: a.t, kelvin: a.kelvin });
		if (c !== a) out.push({ t: c.t, kelvin: c.kelvin });
	}
	return out;
}
