// The thermometer's measured W at a fixed point, from a stored run's raw readings, for a calibration.
//
// A calibration must rest on what the thermometer measured, not on its previous calibration. The run
// page reduces readings through the current coefficients (and a Zn run cannot even be reduced through a
// TPW–In calibration that ends at 429 K). Here every reading is reduced with no deviation at all:
// W = ratio × R_s(t_bath) / R_TPW (R_TPW nearest in time), and T is the reference function's T_r(W), a
// one-to-one relabelling of W. The plateau analysis (zero current, head and pressure removed) then works
// on that scale, and W at the point is W_r(T) of its result: the measured W, whatever the coefficients.
import type SQLite from 'better-sqlite3';
import { referenceRatio, rTpwNearestInTime, type FixedPointId } from '../../metrology/index';
import type { PlateauBudget } from '../../plateau/index';
import { analyseStoredRun, runSamples, type RunAnalysisFacts } from '../analysis/run-analysis';
import { loadReductionContext, type ReductionContext } from '../ingest/reduce';

export interface MeasuredPoint {
	runId: number;
	point: FixedPointId;
	/** measured W at the point: zero current, hydrostatic head and gas pressure removed */
	w: number;
	/** R_TPW nearest in time to the middle of the plateau, Ω */
	rTpwOhm: number;
	/** W × R_TPW: the zero-current resistance at the point, Ω */
	resistanceOhm: number;
	/** standard uncertainty of the plateau value (the run's combined budget), mK */
	uMilliKelvin: number;
	budget: PlateauBudget;
	plateauMidMs: number;
	plateauHours: number;
	slopeMilliKelvinPerHour: number;
	selfHeatingMilliKelvin: number | null;
	hydrostaticMilliKelvin: number | null;
	pressureMilliKelvin: number | null;
}

export type MeasuredResult = { ok: true; value: MeasuredPoint } | { ok: false; runId: number; problem: string };

interface RunFacts extends RunAnalysisFacts {
	reading_count: number;
	highest_seq: number;
}

// Re-analysing a run takes a few hundred milliseconds: keep the answers for what they depend on.
const memo = new Map<string, MeasuredResult>();

export function measuredPoint(sqlite: SQLite.Database, runId: number): MeasuredResult {
	const run = sqlite
		.prepare('select run.kind, run.fixed_point, run.sensor_depth_m, run.gas_pressure_pa, run.reading_count, run.highest_seq, cell.purity_percent, run.thermometer_id, run.resistor_id from run join cell on cell.id = run.cell_id where run.id = ?')
		.get(runId) as (RunFacts & { thermometer_id: number; resistor_id: number }) | undefined;
	if (!run) return { ok: false, runId, problem: `run #${runId} does not exist` };
	const rtpw = sqlite.prepare("select count(*) || ':' || coalesce(max(id), 0) || ':' || coalesce(sum(r_tpw_ohm), 0) as k from thermometer_rtpw where thermometer_id = ?").get(run.thermometer_id) as { k: string };
	const key = `${sqlite.name}|${runId}|${run.reading_count}|${run.highest_seq}|${run.sensor_depth_m}|${run.gas_pressure_pa}|${run.purity_percent}|${run.resistor_id}|${rtpw.k}`;
	const hit = memo.get(key);
	if (hit) return hit;
	const result = compute(sqlite, runId, run);
	if (memo.size > 200) memo.clear();
	memo.set(key, result);
	return result;
}

function compute(sqlite: SQLite.Database, runId: number, run: RunFacts): MeasuredResult {
	const ctx = loadReductionContext(sqlite, runId);
	if (!ctx) return { ok: false, runId, problem: `run #${runId} does not exist` };
	if (ctx.rTpwHistory.length === 0) return { ok: false, runId, problem: 'the thermometer has no R_TPW on file' };
	const raw: ReductionContext = { ...ctx, basis: 'uncalibrated', subrange: null, coefficients: null, prepared: null, problem: null, rTpwSpan: null };
	const { samples, t0Ms } = runSamples(sqlite, raw);
	if (samples.length < 20 || t0Ms === null) return { ok: false, runId, problem: 'too few readings to analyse' };
	const analysis = analyseStoredRun(samples, run);
	if (!analysis.result || !analysis.plateau || !analysis.budget) return { ok: false, runId, problem: 'no plateau found' };
	const w = referenceRatio(analysis.result.t90Kelvin);
	const plateauMidMs = t0Ms + ((analysis.plateau.start + analysis.plateau.end) / 2) * 1000;
	const rTpwOhm = rTpwNearestInTime(ctx.rTpwHistory, plateauMidMs);
	return {
		ok: true,
		value: {
			runId,
			point: run.fixed_point,
			w,
			rTpwOhm,
			resistanceOhm: w * rTpwOhm,
			uMilliKelvin: analysis.budget.combinedStandardUncertainty,
			budget: analysis.budget,
			plateauMidMs,
			plateauHours: (analysis.plateau.end - analysis.plateau.start) / 3600,
			slopeMilliKelvinPerHour: analysis.plateau.slopeMilliKelvinPerHour,
			selfHeatingMilliKelvin: analysis.plateau.selfHeatingMilliKelvin,
			hydrostaticMilliKelvin: analysis.corrections.hydrostaticMilliKelvin,
			pressureMilliKelvin: analysis.corrections.pressureMilliKelvin
		}
	};
}
