// Comparison of stored runs: plateaux overlaid (aligned by start or by fraction), a cell's history as a
// control chart, cell-to-cell differences with the same thermometer, and immersion profiles.
// Each run's figures come from storedRunAnalysis (cached in run.analysis_json); curves are re-reduced and
// decimated here, with the same corrections the analysis applied, so curve and table agree.
import type SQLite from 'better-sqlite3';
import { fixedPoint, isFixedPointId, type FixedPointId } from '../../metrology/index';
import { controlChart, difference, type ControlChart } from '../../history/control-chart';
import { DEFAULT_IMMERSION_TOLERANCE_MILLIKELVIN, immersionProfile, type ImmersionProfile, type ImmersionStep } from '../../history/immersion';
import { decimatedCurve, runSamples, storedRunAnalysis, type StoredRunAnalysis } from '../analysis/run-analysis';
import { loadReductionContext } from '../ingest/reduce';
import type { DB } from '../db';
import { getSetting } from '../repositories/settings';

export interface RunRow {
	id: number;
	fixed_point: FixedPointId;
	kind: string;
	state: string;
	review_state: string;
	started_at: number | null;
	cell_id: number;
	cell_serial: string;
	thermometer_id: number;
	thermometer_serial: string;
}

export interface RunFilters {
	point?: FixedPointId;
	cellId?: number;
	thermometerId?: number;
}

export function readFilters(q: URLSearchParams): RunFilters {
	const f: RunFilters = {};
	const point = q.get('point');
	if (isFixedPointId(point)) f.point = point;
	const cell = Number(q.get('cell'));
	if (Number.isInteger(cell) && cell > 0) f.cellId = cell;
	const th = Number(q.get('thermometer'));
	if (Number.isInteger(th) && th > 0) f.thermometerId = th;
	return f;
}

/** Finished runs, newest first, narrowed by fixed point, cell and thermometer. */
export function finishedRuns(db: DB, f: RunFilters = {}): Promise<RunRow[]> {
	let q = db
		.selectFrom('run')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.select(['run.id', 'run.fixed_point', 'run.kind', 'run.state', 'run.review_state', 'run.started_at', 'run.cell_id', 'cell.serial as cell_serial', 'run.thermometer_id', 'thermometer.serial as thermometer_serial'])
		.where('run.state', '=', 'finished')
		.orderBy('run.started_at', 'desc')
		.limit(300);
	if (f.point) q = q.where('run.fixed_point', '=', f.point);
	if (f.cellId) q = q.where('run.cell_id', '=', f.cellId);
	if (f.thermometerId) q = q.where('run.thermometer_id', '=', f.thermometerId);
	return q.execute();
}

export async function filterOptions(db: DB) {
	const [cells, thermometers] = await Promise.all([
		db.selectFrom('cell').select(['id', 'serial', 'fixed_point']).orderBy('serial').execute(),
		db.selectFrom('thermometer').select(['id', 'serial']).orderBy('serial').execute()
	]);
	return { cells, thermometers };
}

export type Align = 'start' | 'fraction';

export interface OverlayRun {
	run: RunRow;
	problem: string | null;
	/** x: h from plateau start, or % of the plateau; y: mK from the reference */
	curve: { x: number; y: number }[];
	valueMilliKelvin: number | null;
	expandedMilliKelvin: number | null;
	slopeMilliKelvinPerHour: number | null;
	slopeStdErrMilliKelvinPerHour: number | null;
	slopeEarlyMilliKelvinPerHour: number | null;
	durationHours: number | null;
	noiseMilliKelvin: number | null;
	selfHeatingMilliKelvin: number | null;
	plateauStartMs: number | null;
}

function plateauFigures(a: StoredRunAnalysis) {
	const an = a.analysis;
	if (!an?.plateau || !an.result) return null;
	return { an, plateau: an.plateau, result: an.result };
}

/**
 * The chosen runs' plateaux on one scale: mK from the assigned value, or from a reference run's value
 * (then the reference reads 0). Readings are taken to zero current with the run's own self-heating fit and
 * have the head and pressure effects removed, as in the table.
 */
export function overlay(sqlite: SQLite.Database, runs: RunRow[], align: Align, referenceRunId: number | null): { runs: OverlayRun[]; referenceLabel: string } {
	const analyses = new Map(runs.map((r) => [r.id, storedRunAnalysis(sqlite, r.id)]));
	const ref = referenceRunId ? analyses.get(referenceRunId) : null;
	const refFig = ref ? plateauFigures(ref) : null;
	const referenceLabel = refFig ? `run #${referenceRunId}` : 'the assigned value';
	const out = runs.map((run): OverlayRun => {
		const a = analyses.get(run.id);
		const empty: OverlayRun = { run, problem: a?.problem ?? 'cannot be analysed', curve: [], valueMilliKelvin: null, expandedMilliKelvin: null, slopeMilliKelvinPerHour: null, slopeStdErrMilliKelvinPerHour: null, slopeEarlyMilliKelvinPerHour: null, durationHours: null, noiseMilliKelvin: null, selfHeatingMilliKelvin: null, plateauStartMs: null };
		const fig = a ? plateauFigures(a) : null;
		if (!a || !fig) return empty;
		// Against a reference run of another fixed point the difference means nothing: use the assigned value.
		const refKelvin = refFig && refFig.result.point === fig.result.point ? refFig.result.t90Kelvin : fig.result.assignedKelvin;
		const ctx = loadReductionContext(sqlite, run.id);
		const { samples } = ctx ? runSamples(sqlite, ctx) : { samples: [] };
		const shiftK = ((fig.an.corrections.hydrostaticMilliKelvin ?? 0) + (fig.an.corrections.pressureMilliKelvin ?? 0)) / 1000;
		const kK = fig.an.selfHeating ? fig.an.selfHeating.kMilliKelvinPerMilliAmp2 / 1000 : 0;
		const { start, end } = fig.plateau;
		const dur = end - start;
		const inside = samples.filter((s) => s.t >= start && s.t <= end);
		const mapped = inside.map((s) => ({
			t: align === 'start' ? (s.t - start) / 3600 : ((s.t - start) / dur) * 100,
			kelvin: (s.kelvin - shiftK - kK * (s.currentMilliAmp ?? 0) ** 2 - refKelvin) * 1000
		}));
		const early = fig.an.fractionSlopes.find((f) => f.fractionFrom === 0.1 && f.fractionTo === 0.5);
		return {
			run,
			problem: null,
			curve: decimatedCurve(mapped, 300).map((p) => ({ x: p.t, y: p.kelvin })),
			valueMilliKelvin: (fig.result.t90Kelvin - refKelvin) * 1000,
			expandedMilliKelvin: fig.an.budget?.expandedUncertainty ?? null,
			slopeMilliKelvinPerHour: fig.plateau.slopeMilliKelvinPerHour,
			slopeStdErrMilliKelvinPerHour: fig.plateau.slopeStdErrMilliKelvinPerHour,
			slopeEarlyMilliKelvinPerHour: early?.slopeMilliKelvinPerHour ?? null,
			durationHours: dur / 3600,
			noiseMilliKelvin: fig.plateau.noiseMilliKelvin,
			selfHeatingMilliKelvin: fig.plateau.selfHeatingMilliKelvin,
			plateauStartMs: a.t0Ms !== null ? a.t0Ms + start * 1000 : null
		};
	});
	return { runs: out, referenceLabel };
}

export interface Realization {
	run: RunRow;
	/** UTC ms of the plateau's middle */
	atMs: number;
	valueMilliKelvin: number;
	uMilliKelvin: number;
	expandedMilliKelvin: number;
}

/** Every realization of the cell with a plateau: mK from the assigned value, with its u. */
export async function realizations(db: DB, sqlite: SQLite.Database, cellId: number): Promise<{ realizations: Realization[]; skipped: { run: RunRow; problem: string }[] }> {
	const runs = await finishedRuns(db, { cellId });
	const list: Realization[] = [];
	const skipped: { run: RunRow; problem: string }[] = [];
	for (const run of runs) {
		const a = storedRunAnalysis(sqlite, run.id);
		const fig = a ? plateauFigures(a) : null;
		if (!a || !fig || !fig.an.budget || a.t0Ms === null) {
			skipped.push({ run, problem: a?.problem ?? 'cannot be analysed' });
			continue;
		}
		list.push({
			run,
			atMs: a.t0Ms + ((fig.plateau.start + fig.plateau.end) / 2) * 1000,
			valueMilliKelvin: fig.result.deltaMilliKelvin,
			uMilliKelvin: fig.an.budget.combinedStandardUncertainty,
			expandedMilliKelvin: fig.an.budget.expandedUncertainty
		});
	}
	list.sort((x, y) => x.atMs - y.atMs);
	return { realizations: list, skipped };
}

export interface CellHistory {
	realizations: Realization[];
	skipped: { run: RunRow; problem: string }[];
	chart: ControlChart;
}

export async function cellHistory(db: DB, sqlite: SQLite.Database, cellId: number): Promise<CellHistory> {
	const { realizations: list, skipped } = await realizations(db, sqlite, cellId);
	const chart = controlChart(list.map((r) => ({ id: r.run.id, x: r.atMs, y: r.valueMilliKelvin, u: r.uMilliKelvin })));
	return { realizations: list, skipped, chart };
}

export interface CellPair {
	thermometerId: number;
	thermometerSerial: string;
	a: Realization;
	b: Realization;
	differenceMilliKelvin: number;
	uMilliKelvin: number;
	expandedMilliKelvin: number;
	agree: boolean;
	daysApart: number;
}

/**
 * Cell A against cell B of the same fixed point: for every thermometer used in both, the newest run in each
 * (closest in time to each other when there are several), A − B in mK with u combined in quadrature.
 */
export function compareCells(a: Realization[], b: Realization[]): CellPair[] {
	const out: CellPair[] = [];
	const thermometers = new Set(a.map((r) => r.run.thermometer_id).filter((t) => b.some((r) => r.run.thermometer_id === t)));
	for (const t of thermometers) {
		const ra = a.filter((r) => r.run.thermometer_id === t);
		const rb = b.filter((r) => r.run.thermometer_id === t);
		const newestA = ra.at(-1)!;
		const nearestB = rb.reduce((p, q) => (Math.abs(q.atMs - newestA.atMs) < Math.abs(p.atMs - newestA.atMs) ? q : p));
		const d = difference({ value: newestA.valueMilliKelvin, u: newestA.uMilliKelvin }, { value: nearestB.valueMilliKelvin, u: nearestB.uMilliKelvin });
		out.push({ thermometerId: t, thermometerSerial: newestA.run.thermometer_serial, a: newestA, b: nearestB, differenceMilliKelvin: d.value, uMilliKelvin: d.u, expandedMilliKelvin: d.expanded, agree: d.agree, daysApart: Math.abs(newestA.atMs - nearestB.atMs) / 86_400_000 });
	}
	return out;
}

export const IMMERSION_SETTLE_S = 600;

/** Lab setting 'limits.immersionToleranceMilliKelvin' (default 0.1 mK). */
export async function immersionTolerance(db: DB): Promise<number> {
	const v = await getSetting<unknown>(db, 'limits.immersionToleranceMilliKelvin', DEFAULT_IMMERSION_TOLERANCE_MILLIKELVIN);
	return typeof v === 'number' && v > 0 ? v : DEFAULT_IMMERSION_TOLERANCE_MILLIKELVIN;
}

/** Runs that hold immersion-step events. */
export function immersionRuns(db: DB) {
	return db
		.selectFrom('run_event')
		.innerJoin('run', 'run.id', 'run_event.run_id')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.select((eb) => ['run.id', 'run.fixed_point', 'run.started_at', 'cell.serial as cell_serial', 'thermometer.serial as thermometer_serial', eb.fn.count<number>('run_event.id').as('steps')])
		.where('run_event.kind', '=', 'immersion-step')
		.groupBy('run.id')
		.orderBy('run.started_at', 'desc')
		.execute();
}

export interface ImmersionResult {
	profile: ImmersionProfile | null;
	steps: ImmersionStep[];
	driftMilliKelvinPerHour: number | null;
	driftSource: 'return to the deepest step' | 'plateau slope' | 'none';
	problem: string | null;
}

/**
 * The plateau value at each step: the mean (at zero current) from 10 min after the step to the next one.
 * The plateau's own drift is removed: from the return to the deepest step at the end, when the run has one
 * (common practice), otherwise from the fitted plateau slope.
 */
export async function immersionOf(db: DB, sqlite: SQLite.Database, runId: number, toleranceMilliKelvin: number): Promise<ImmersionResult> {
	const events = await db.selectFrom('run_event').select(['time_ms', 'depth_m']).where('run_id', '=', runId).where('kind', '=', 'immersion-step').where('depth_m', 'is not', null).orderBy('time_ms').execute();
	const none: ImmersionResult = { profile: null, steps: [], driftMilliKelvinPerHour: null, driftSource: 'none', problem: null };
	if (events.length === 0) return { ...none, problem: 'this run has no immersion steps' };
	const a = storedRunAnalysis(sqlite, runId);
	const ctx = loadReductionContext(sqlite, runId);
	if (!a || !ctx || a.t0Ms === null || !a.analysis?.plateau) return { ...none, problem: a?.problem ?? 'the run cannot be analysed' };
	const t0 = a.t0Ms;
	const plateauEndMs = t0 + a.analysis.plateau.end * 1000;
	const kK = a.analysis.selfHeating ? a.analysis.selfHeating.kMilliKelvinPerMilliAmp2 / 1000 : 0;
	const { samples } = runSamples(sqlite, ctx);
	// The last step is held as long as the others (the median gap), not to the end of the plateau.
	const gaps = events.slice(1).map((e, i) => e.time_ms - events[i].time_ms).sort((x, y) => x - y);
	const lastHoldMs = gaps.length ? gaps[Math.floor(gaps.length / 2)] : Infinity;
	const raw = events.map((e, i) => {
		const from = e.time_ms + IMMERSION_SETTLE_S * 1000;
		const to = Math.min(events[i + 1]?.time_ms ?? e.time_ms + lastHoldMs, plateauEndMs);
		const inWindow = samples.filter((s) => t0 + s.t * 1000 >= from && t0 + s.t * 1000 < to);
		const ys = inWindow.map((s) => s.kelvin - kK * (s.currentMilliAmp ?? 0) ** 2);
		const n = ys.length;
		const mean = n ? ys.reduce((p, q) => p + q, 0) / n : NaN;
		const sd = n > 1 ? Math.sqrt(ys.reduce((p, q) => p + (q - mean) ** 2, 0) / (n - 1)) : NaN;
		return { depthMetre: e.depth_m as number, valueKelvin: mean, uKelvin: n > 1 ? sd / Math.sqrt(n) : undefined, startMs: from, endMs: to, readings: n, midMs: (from + to) / 2 };
	}).filter((s) => s.readings > 0);
	if (raw.length === 0) return { ...none, problem: 'no readings on the plateau after the steps' };
	const deepest = Math.max(...raw.map((s) => s.depthMetre));
	const first = raw[0];
	const last = raw.at(-1)!;
	let driftKPerMs = 0;
	let driftSource: ImmersionResult['driftSource'] = 'plateau slope';
	if (raw.length > 2 && first.depthMetre === deepest && last.depthMetre === deepest && last.midMs > first.midMs) {
		driftKPerMs = (last.valueKelvin - first.valueKelvin) / (last.midMs - first.midMs);
		driftSource = 'return to the deepest step';
	} else driftKPerMs = a.analysis.plateau.slopeMilliKelvinPerHour / 1000 / 3_600_000;
	const corrected = raw.map((s) => ({ ...s, valueKelvin: s.valueKelvin - driftKPerMs * (s.midMs - first.midMs) }));
	// The return step has done its work (it measured the drift); the profile keeps the first visit.
	const steps: ImmersionStep[] = (driftSource === 'return to the deepest step' ? corrected.slice(0, -1) : corrected).map(({ midMs: _m, ...s }) => s);
	return { profile: immersionProfile(a.analysis.result?.point ?? ctx.fixedPoint, steps, toleranceMilliKelvin), steps, driftMilliKelvinPerHour: driftKPerMs * 1000 * 3_600_000, driftSource, problem: null };
}

export function fixedPointName(p: FixedPointId): string {
	return fixedPoint(p).name;
}
