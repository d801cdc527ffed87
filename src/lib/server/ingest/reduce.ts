// Reduction of raw readings through the metrology core, with everything a run needs read once and
// cached (no database read per reading): the standard resistor, the thermometer's R_TPW history and
// current calibration, and the cell conditions (sensor depth, gas pressure).

import type SQLite from 'better-sqlite3';
import {
	expectedSensorKelvin,
	resistanceFromBridgeRatio,
	rTpwNearestInTime,
	prepareDeviation,
	temperatureFromPreparedRatio,
	temperatureFromRatio,
	type DeviationCoefficients,
	type PreparedDeviation,
	type FixedPointId,
	type StandardResistor,
	type SubrangeId
} from '$lib/metrology';
import type { RunKind, RunState } from '../db/schema';
import type { LiveReading, ReductionBasis } from '$lib/live/protocol';
import type { ValidReading } from './validate';

export interface ReductionContext {
	runId: number;
	benchId: number;
	benchName: string;
	state: RunState;
	fixedPoint: FixedPointId;
	kind: RunKind;
	resistor: StandardResistor;
	resistorTemperatureCelsius: number;
	/** R_TPW checks of the thermometer, oldest first */
	rTpwHistory: { timeMs: number; rTpwOhm: number }[];
	basis: ReductionBasis;
	subrange: SubrangeId | null;
	coefficients: DeviationCoefficients | null;
	/** the calibration's deviation function checked once (null: none, or coefficients it refuses) */
	prepared: PreparedDeviation | null;
	corrections: { depthMetre: number; pressurePa: number };
	expectedKelvin: number | null;
	loadedAtMs: number;
	/** why a reduction cannot be made, when basis is 'unavailable' */
	problem: string | null;
	/** the R_TPW nearest in time is piecewise constant: remember the span the last answer holds for */
	rTpwSpan: { fromMs: number; toMs: number; ohm: number } | null;
}

interface RunRow {
	id: number;
	bench_id: number;
	bench_name: string;
	state: RunState;
	fixed_point: FixedPointId;
	kind: RunKind;
	thermometer_id: number;
	sensor_depth_m: number;
	gas_pressure_pa: number;
	calibrated_ohm: number;
	reference_temperature_c: number;
	alpha_per_k: number;
	beta_per_k2: number;
	bath_temperature_c: number;
}

/** With no calibration the deviation is taken as zero (W_r = W); any sub-range of the right side of the TPW then gives T90 from the reference function. */
const ZERO: DeviationCoefficients = { a: 0, b: 0, c: 0, d: 0, wAl: 1e9 };
const ZERO_BELOW_TPW = prepareDeviation('Ar-Hg-TPW', ZERO);
const ZERO_ABOVE_TPW = prepareDeviation('TPW-Sn-Zn-Al-Ag', ZERO);

export function loadReductionContext(sqlite: SQLite.Database, runId: number, nowMs = Date.now()): ReductionContext | null {
	const run = sqlite
		.prepare(
			`select run.id, run.bench_id, run.state, run.fixed_point, run.kind, run.thermometer_id, run.sensor_depth_m, run.gas_pressure_pa,
			        r.calibrated_ohm, r.reference_temperature_c, r.alpha_per_k, r.beta_per_k2, r.bath_temperature_c, b.name as bench_name
			   from run join standard_resistor r on r.id = run.resistor_id join bench b on b.id = run.bench_id where run.id = ?`
		)
		.get(runId) as RunRow | undefined;
	if (!run) return null;
	const rTpwHistory = (sqlite.prepare('select measured_at as timeMs, r_tpw_ohm as rTpwOhm from thermometer_rtpw where thermometer_id = ? order by measured_at').all(run.thermometer_id) as { timeMs: number; rTpwOhm: number }[]);
	const cal = sqlite
		.prepare("select subrange, coefficients_json, r_tpw_ohm from calibration where thermometer_id = ? and status = 'current' order by version desc limit 1")
		.get(run.thermometer_id) as { subrange: SubrangeId; coefficients_json: string; r_tpw_ohm: number } | undefined;
	let basis: ReductionBasis = 'uncalibrated';
	let coefficients: DeviationCoefficients | null = null;
	let problem: string | null = null;
	if (cal) {
		try {
			coefficients = JSON.parse(cal.coefficients_json) as DeviationCoefficients;
			basis = 'calibrated';
		} catch {
			problem = 'the current calibration has unreadable coefficients';
		}
		// A calibration carries the R_TPW it was made with: better than nothing when no check is on file.
		if (rTpwHistory.length === 0) rTpwHistory.push({ timeMs: 0, rTpwOhm: cal.r_tpw_ohm });
	}
	if (rTpwHistory.length === 0) problem = 'the thermometer has no R_TPW on file';
	if (problem) basis = 'unavailable';
	const corrections = { depthMetre: run.sensor_depth_m, pressurePa: run.gas_pressure_pa };
	let expectedKelvin: number | null = null;
	try {
		expectedKelvin = expectedSensorKelvin(run.fixed_point, corrections);
	} catch {
		expectedKelvin = null;
	}
	return {
		runId: run.id,
		benchId: run.bench_id,
		benchName: run.bench_name,
		state: run.state,
		fixedPoint: run.fixed_point,
		kind: run.kind,
		resistor: { calibratedOhm: run.calibrated_ohm, referenceTemperatureCelsius: run.reference_temperature_c, alphaPerKelvin: run.alpha_per_k, betaPerKelvin2: run.beta_per_k2 },
		resistorTemperatureCelsius: run.bath_temperature_c,
		rTpwHistory,
		basis,
		subrange: cal?.subrange ?? null,
		coefficients,
		prepared: prepared(cal?.subrange ?? null, coefficients),
		corrections,
		expectedKelvin,
		loadedAtMs: nowMs,
		problem,
		rTpwSpan: null
	};
}

function prepared(subrange: SubrangeId | null, coefficients: DeviationCoefficients | null): PreparedDeviation | null {
	if (!subrange || !coefficients) return null;
	try {
		return prepareDeviation(subrange, coefficients);
	} catch {
		return null; // each reading then meets temperatureFromRatio's own error, which says what is wrong
	}
}

function rTpwAt(ctx: ReductionContext, timeMs: number): number {
	const span = ctx.rTpwSpan;
	if (span && timeMs >= span.fromMs && timeMs < span.toMs) return span.ohm;
	const ohm = rTpwNearestInTime(ctx.rTpwHistory, timeMs);
	// The answer holds between the midpoints to the neighbouring checks (ties go to the earlier one).
	const h = ctx.rTpwHistory;
	let i = 0;
	while (i < h.length - 1 && Math.abs(h[i + 1].timeMs - timeMs) < Math.abs(h[i].timeMs - timeMs)) i++;
	const fromMs = i === 0 ? -Infinity : Math.floor((h[i - 1].timeMs + h[i].timeMs) / 2) + 1;
	const toMs = i === h.length - 1 ? Infinity : Math.floor((h[i].timeMs + h[i + 1].timeMs) / 2) + 1;
	ctx.rTpwSpan = h[i].rTpwOhm === ohm ? { fromMs, toMs, ohm } : null;
	return ohm;
}

/** The derived values of one reading (null where the reduction could not be made). */
export interface ReducedValues {
	resistanceOhm: number | null;
	w: number | null;
	t90Kelvin: number | null;
	deltaMilliKelvin: number | null;
	problem: string | null;
}

export function emptyReduced(): ReducedValues {
	return { resistanceOhm: null, w: null, t90Kelvin: null, deltaMilliKelvin: null, problem: null };
}

/**
 * Reduces one reading into `out` (reused by the reducer, which meets every reading of every run, so
 * that it makes no object per reading). Never throws: a failure leaves the values null and says why.
 */
export function reduceInto(ctx: ReductionContext, ratio: number, timeMs: number, out: ReducedValues): void {
	out.resistanceOhm = null;
	out.w = null;
	out.t90Kelvin = null;
	out.deltaMilliKelvin = null;
	out.problem = null;
	if (ctx.basis === 'unavailable') return;
	try {
		const rTpwOhm = rTpwAt(ctx, timeMs);
		let deviation = ctx.prepared;
		if (ctx.basis === 'uncalibrated') {
			const w = (ratio * ctx.resistor.calibratedOhm) / rTpwOhm;
			deviation = w < 1 ? ZERO_BELOW_TPW : ZERO_ABOVE_TPW;
		}
		// reduceReading's steps (R = ratio × R_s(t); W = R/R_TPW; T90 from W; minus the expected sensor
		// temperature), with the expected temperature and its corrections computed once per run.
		const resistanceOhm = resistanceFromBridgeRatio(ratio, ctx.resistor, ctx.resistorTemperatureCelsius);
		const w = resistanceOhm / rTpwOhm;
		const t90Kelvin = deviation ? temperatureFromPreparedRatio(w, deviation) : temperatureFromRatio(w, ctx.subrange!, ctx.coefficients!);
		out.resistanceOhm = resistanceOhm;
		out.w = w;
		out.t90Kelvin = t90Kelvin;
		out.deltaMilliKelvin = ctx.expectedKelvin === null ? null : (t90Kelvin - ctx.expectedKelvin) * 1000;
	} catch (e) {
		out.problem = (e as Error).message;
	}
}

/** One reading reduced for display and the detector. Never throws: a failure leaves the derived values null. */
export function reduceForLive(ctx: ReductionContext, r: ValidReading, timeBackwards: boolean): LiveReading {
	const v = emptyReduced();
	reduceInto(ctx, r.ratio, r.timeMs, v);
	const out: LiveReading = {
		seq: r.seq,
		timeMs: r.timeMs,
		ratio: r.ratio,
		currentMilliAmp: r.currentMilliAmp,
		channel: r.channel,
		resistanceOhm: v.resistanceOhm,
		w: v.w,
		t90Kelvin: v.t90Kelvin,
		deltaMilliKelvin: v.deltaMilliKelvin
	};
	if (timeBackwards) out.timeBackwards = true;
	if (v.problem) out.problem = v.problem;
	return out;
}
