/**
 * Final analysis of a completed run: plateau window, mean, slope ± u, noise, self-heating and zero
 * current, fraction curve and Raoult (1/F) fit, impurity, corrections and the uncertainty budget.
 */
import {
	fixedPoint,
	hydrostaticCorrectionKelvin,
	impurityFromInverseFractionSlope,
	omeDepressionKelvin,
	pressureCorrectionKelvin,
	purityToImpurityMolFraction,
	referenceRatio,
	type FixedPointId
} from '../metrology/index';
import { blockedLine, type BlockedLine } from './blocked';
import { fitGaussMarkovNoise, type GaussMarkovNoise } from './noise-model';
import { combineSteps, estimateCurrentStep, type CurrentStep } from './current-step';
import { indexAtOrAfter, locatePlateau } from './locate';
import { prepareSeries, type RunSeries } from './series';
import { fitLine, finiteOrNull, fitLinearModel } from './stats';
import { buildBudget, type PlateauBudget } from './budget';
import type { PlateauKind, PlateauResult, Sample } from './types';

const TO_MK_PER_H = 3.6e6;
/** stretch of the plateau (fraction) and trend degree of the noise model for short windows */
const NOISE_MODEL_FRACTION: [number, number] = [0.1, 0.9];
const NOISE_MODEL_DEGREE = 7;

export interface AnalysisOptions {
	kind: PlateauKind;
	point?: FixedPointId;
	depthMetre?: number;
	pressurePa?: number;
	purityPercent?: number;
	/** triple points: which way the cell is being driven (default: read from the plateau's slope) */
	transition?: 'melting' | 'freezing';
	/** |slope| below which the run counts as flat (mK/h) */
	flatSlopeMilliKelvinPerHour?: number;
	detectWindowS?: number;
	minPlateauS?: number;
	/** the plateau starts once the readings stay this close to the plateau curve (K) */
	settledBandKelvin?: number;
	/** rate that marks a disturbance or the departure after the knee (mK/h) */
	fastMilliKelvinPerHour?: number;
	settleS?: number;
	outlierSigma?: number;
	/** transformation-fraction window of the stated slope and mean, default 20–80 % */
	slopeFraction?: [number, number];
	/** transformation-fraction window of the Raoult fit, default 20–80 % */
	raoultFraction?: [number, number];
	/** uncertainty (half-width, rectangular) of the immersion depth (m) */
	depthHalfWidthMetre?: number;
	/** uncertainty (half-width, rectangular) of the pressure over the melt (Pa) */
	pressureHalfWidthPa?: number;
}

export interface FractionPoint {
	t: number;
	/** fraction melted (melting) or frozen (freezing), 0..1 */
	fraction: number;
	liquidFraction: number;
	inverseLiquidFraction: number;
	kelvin: number;
}

export interface SlopeOver {
	fractionFrom: number;
	fractionTo: number;
	start: number;
	end: number;
	slopeMilliKelvinPerHour: number;
	slopeStdErrMilliKelvinPerHour: number;
	/** temperature change across the interval from the fitted slope (mK) */
	changeMilliKelvin: number;
}

export interface RaoultFit {
	/** slope of T against 1/F, mK per unit 1/F (Raoult: −c/A) */
	slopeMilliKelvin: number;
	slopeStdErrMilliKelvin: number;
	/** intercept at 1/F = 0: the impurity-free temperature (K) */
	pureKelvin: number;
	fractionFrom: number;
	fractionTo: number;
	n: number;
}

export interface RunAnalysis {
	plateau: PlateauResult | null;
	endObserved: boolean;
	durationS: number | null;
	transition: 'melting' | 'freezing' | null;
	selfHeating: {
		kMilliKelvinPerMilliAmp2: number;
		kStdErrMilliKelvinPerMilliAmp2: number;
		lowCurrentMilliAmp: number;
		atLowCurrentMilliKelvin: number;
		atLowCurrentStdErrMilliKelvin: number;
		/** the plateau mean at the lower current, before extrapolation (K) */
		meanAtLowCurrentKelvin: number;
		steps: CurrentStep[];
	} | null;
	/** Time-proportional fraction curve (decimated) and its 1/F fit */
	fractionCurve: FractionPoint[];
	inverseFractionFit: RaoultFit | null;
	fractionSlopes: SlopeOver[];
	/** T at 1/F = 1 from the Raoult fit (K) */
	liquidusKelvin: number | null;
	impurity: {
		/** apparent total impurity from the Raoult slope, mol/mol */
		apparentMolFraction: number | null;
		/** impurity from the stated purity, mol/mol, and its OME depression (mK) */
		statedMolFraction: number | null;
		omeMilliKelvin: number | null;
		note: string | null;
	};
	corrections: {
		hydrostaticMilliKelvin: number | null;
		pressureMilliKelvin: number | null;
		note: string;
	};
	result: {
		point: FixedPointId;
		assignedKelvin: number;
		/** plateau mean with the hydrostatic and pressure effects removed (K) */
		t90Kelvin: number;
		deltaMilliKelvin: number;
		/** W_r of the reference function at that temperature, and the assigned W_r (Table 1) */
		wr: number;
		assignedWr: number;
		deltaW: number;
	} | null;
	budget: PlateauBudget | null;
	outliers: number;
	readings: number;
	notes: string[];
}

export function analyseRun(samples: Sample[], options: AnalysisOptions): RunAnalysis {
	const o = {
		flatSlopeMilliKelvinPerHour: 10,
		detectWindowS: 600,
		minPlateauS: 600,
		settledBandKelvin: 1e-4,
		fastMilliKelvinPerHour: 1000,
		settleS: 60,
		outlierSigma: 8,
		slopeFraction: [0.2, 0.8] as [number, number],
		raoultFraction: [0.2, 0.8] as [number, number],
		depthHalfWidthMetre: 0.005,
		pressureHalfWidthPa: 50,
		...Object.fromEntries(Object.entries(options).filter(([, v]) => v !== undefined))
	} as Required<Omit<AnalysisOptions, 'point' | 'depthMetre' | 'pressurePa' | 'purityPercent' | 'transition'>> & AnalysisOptions;
	const notes: string[] = [];
	const s = prepareSeries(samples, o.settleS, o.outlierSigma);
	const n = s.t.length;
	const empty: RunAnalysis = {
		plateau: null,
		endObserved: false,
		durationS: null,
		transition: null,
		selfHeating: null,
		fractionCurve: [],
		inverseFractionFit: null,
		fractionSlopes: [],
		liquidusKelvin: null,
		impurity: { apparentMolFraction: null, statedMolFraction: null, omeMilliKelvin: null, note: null },
		corrections: { hydrostaticMilliKelvin: null, pressureMilliKelvin: null, note: 'no plateau' },
		result: null,
		budget: null,
		outliers: s.outlier.reduce((a, b) => a + b, 0),
		readings: n,
		notes
	};
	if (n < 20) {
		notes.push('too few readings');
		return empty;
	}

	// 1. self-heating from every current change, so that the plateau is sought on one common scale
	let steps = currentSteps(s, o.settleS);
	let k = combineSteps(steps);
	let y = zeroCurrent(s, k?.k ?? null);
	const direction: 1 | -1 | 0 = o.kind === 'melt' ? 1 : o.kind === 'freeze' ? -1 : o.transition === 'melting' ? 1 : o.transition === 'freezing' ? -1 : 0;
	const located = locatePlateau(s.t, y, s.ok, {
		direction,
		flatSlopeKelvinPerS: o.flatSlopeMilliKelvinPerHour / TO_MK_PER_H,
		detectWindowS: o.detectWindowS,
		minPlateauS: o.minPlateauS,
		bandKelvin: o.settledBandKelvin,
		fastKelvinPerS: o.fastMilliKelvinPerHour / TO_MK_PER_H,
		switches: s.switches
	});
	if (!located) {
		notes.push('no plateau: the readings never stayed flat for the minimum plateau time');
		return empty;
	}
	const { start, end, endObserved } = located;
	// 2. self-heating again from the changes on the plateau only (the plateau is what it describes)
	const onPlateau = steps.filter((st) => st.atS > start && st.atS < end);
	if (onPlateau.length) {
		steps = onPlateau;
		k = combineSteps(steps);
		y = zeroCurrent(s, k?.k ?? null);
	}
	const duration = end - start;
	const idx = (time: number) => indexAtOrAfter(s.t, time);
	const window = (f0: number, f1: number) => ({ a: start + f0 * duration, b: start + f1 * duration });
	const minBlockS = Math.max(30, 4 * (s.medianDtS || 1));
	// noise model of the plateau, for windows too short to show slow noise themselves (fitted once,
	// on demand): 10–90 % leaves out the recovery from recalescence and the knee, where no polynomial
	// of modest degree follows the curve; over 80 % of a freeze 1/F changes ninefold, so a septic
	// (a quintic left a misfit there that passed for slow noise)
	let plateauNoise: GaussMarkovNoise | null | undefined;
	const noiseModel = () => {
		if (plateauNoise === undefined) {
			const nw = window(NOISE_MODEL_FRACTION[0], NOISE_MODEL_FRACTION[1]);
			plateauNoise = fitGaussMarkovNoise(s.t, y, s.ok, idx(nw.a), idx(nw.b), { degree: NOISE_MODEL_DEGREE, minBlockS: s.medianDtS || 0 });
		}
		return plateauNoise;
	};

	// 3. slope and mean over the stated window
	const w = window(o.slopeFraction[0], o.slopeFraction[1]);
	const fit = blockedLine(s.t, y, s.ok, idx(w.a), idx(w.b), minBlockS, noiseModel);
	if (!fit) {
		notes.push('too few readings in the slope window');
		return empty;
	}
	const lowI = minCurrent(s);
	let selfHeating: RunAnalysis['selfHeating'] = null;
	let meanKelvin = fit.mean;
	if (k && lowI !== null) {
		// mean at the lower current over the same window, for the record
		const raw = blockedLine(s.t, addSelfHeating(y, s, k.k, lowI), s.ok, idx(w.a), idx(w.b), minBlockS, noiseModel);
		selfHeating = {
			kMilliKelvinPerMilliAmp2: k.k * 1000,
			kStdErrMilliKelvinPerMilliAmp2: k.u * 1000,
			lowCurrentMilliAmp: lowI,
			atLowCurrentMilliKelvin: k.k * lowI * lowI * 1000,
			atLowCurrentStdErrMilliKelvin: k.u * lowI * lowI * 1000,
			meanAtLowCurrentKelvin: raw ? raw.mean : fit.mean + k.k * lowI * lowI,
			steps
		};
		meanKelvin = fit.mean; // y is already at zero current
	}
	const plateau: PlateauResult = {
		start,
		end,
		meanKelvin,
		slopeMilliKelvinPerHour: fit.slope * TO_MK_PER_H,
		slopeStdErrMilliKelvinPerHour: fit.slopeStdErr * TO_MK_PER_H,
		slopeWindow: { start: w.a, end: w.b },
		noiseMilliKelvin: fit.sigma * 1000,
		selfHeatingMilliKelvin: selfHeating ? selfHeating.atLowCurrentMilliKelvin : null,
		slopeUncertaintySource: fit.slopeUncertaintySource
	};

	// 4. fraction: time-proportional, i.e. the heat flow into (or out of) the cell is taken as constant
	// over the plateau, so the fraction transformed grows linearly from the start to the knee
	const transition: 'melting' | 'freezing' = direction === 1 ? 'melting' : direction === -1 ? 'freezing' : fit.slope >= 0 ? 'melting' : 'freezing';
	const liquidOf = (f: number) => (transition === 'melting' ? f : 1 - f);
	const fractionSlopes: SlopeOver[] = [];
	let fractionCurve: FractionPoint[] = [];
	let inverseFractionFit: RaoultFit | null = null;
	let liquidusKelvin: number | null = null;
	if (endObserved) {
		fractionCurve = decimatedFraction(s, y, start, end, liquidOf);
		for (const [f0, f1] of [
			[0.1, 0.5],
			[0.2, 0.8]
		] as const) {
			const ww = window(f0, f1);
			const f = blockedLine(s.t, y, s.ok, idx(ww.a), idx(ww.b), minBlockS, noiseModel);
			if (f)
				fractionSlopes.push({
					fractionFrom: f0,
					fractionTo: f1,
					start: ww.a,
					end: ww.b,
					slopeMilliKelvinPerHour: f.slope * TO_MK_PER_H,
					slopeStdErrMilliKelvinPerHour: f.slopeStdErr * TO_MK_PER_H,
					changeMilliKelvin: f.slope * (ww.b - ww.a) * 1000
				});
		}
		inverseFractionFit = raoultFit(s, y, start, duration, liquidOf, o.raoultFraction, minBlockS);
		if (inverseFractionFit) liquidusKelvin = inverseFractionFit.pureKelvin + inverseFractionFit.slopeMilliKelvin / 1000;
	} else notes.push('the run ended on the plateau: no fraction curve (the end of the transformation is unknown)');

	// 5. impurity, corrections, result and budget (need the point)
	const impurity: RunAnalysis['impurity'] = { apparentMolFraction: null, statedMolFraction: null, omeMilliKelvin: null, note: null };
	const corrections: RunAnalysis['corrections'] = { hydrostaticMilliKelvin: null, pressureMilliKelvin: null, note: 'no point given' };
	let result: RunAnalysis['result'] = null;
	let budget: PlateauBudget | null = null;
	if (o.point) {
		const fp = fixedPoint(o.point);
		if (inverseFractionFit) {
			const slopeK = inverseFractionFit.slopeMilliKelvin / 1000;
			if (slopeK <= 0) impurity.apparentMolFraction = impurityFromInverseFractionSlope(o.point, slopeK);
			else impurity.note = 'T rises with 1/F: not Raoult behaviour, no impurity estimate from the slope';
		}
		if (o.purityPercent !== undefined) {
			impurity.statedMolFraction = purityToImpurityMolFraction(o.purityPercent);
			impurity.omeMilliKelvin = omeDepressionKelvin(o.point, impurity.statedMolFraction) * 1000;
		}
		const hK = o.depthMetre !== undefined ? hydrostaticCorrectionKelvin(o.point, o.depthMetre) : 0;
		const pK = o.pressurePa !== undefined ? pressureCorrectionKelvin(o.point, o.pressurePa) : 0;
		corrections.hydrostaticMilliKelvin = o.depthMetre !== undefined ? hK * 1000 : null;
		corrections.pressureMilliKelvin = o.pressurePa !== undefined ? pK * 1000 : null;
		corrections.note = 'effects at the sensor (ITS-90 Table 2): subtracted from the plateau mean to give T90';
		const t90Kelvin = meanKelvin - hK - pK;
		const wr = referenceRatio(t90Kelvin);
		result = {
			point: o.point,
			assignedKelvin: fp.t90,
			t90Kelvin,
			deltaMilliKelvin: (t90Kelvin - fp.t90) * 1000,
			wr,
			assignedWr: fp.wr,
			deltaW: wr - fp.wr
		};
		budget = buildBudget({
			point: o.point,
			fit,
			windowS: w.b - w.a,
			selfHeating,
			meanSquareCurrent: k ? meanSquareCurrent(s, idx(w.a), idx(w.b)) : null,
			depthMetre: o.depthMetre,
			depthHalfWidthMetre: o.depthHalfWidthMetre,
			pressurePa: o.pressurePa,
			pressureHalfWidthPa: o.pressureHalfWidthPa,
			impurityMolFraction: impurity.statedMolFraction ?? impurity.apparentMolFraction,
			impuritySource: impurity.statedMolFraction !== null ? 'stated purity' : 'Raoult slope of this run'
		});
	}
	return {
		...empty,
		plateau,
		endObserved,
		durationS: duration,
		transition,
		selfHeating,
		fractionCurve,
		inverseFractionFit,
		fractionSlopes,
		liquidusKelvin,
		impurity,
		corrections,
		result,
		budget
	};
}


/** One step per current change, fitted over 5 min either side (settling excluded). */
function currentSteps(s: RunSeries, settleS: number, sideS = 300): CurrentStep[] {
	const out: CurrentStep[] = [];
	s.switches.forEach((k0, j) => {
		const ts = s.t[k0];
		const ia = s.i[k0 - 1];
		const ib = s.i[k0];
		const prevSwitch = j > 0 ? s.switches[j - 1] : 0;
		const nextSwitch = j + 1 < s.switches.length ? s.switches[j + 1] : s.t.length;
		const before = { t: [] as number[], x: [] as number[] };
		const after = { t: [] as number[], x: [] as number[] };
		for (let k = k0 - 1; k >= prevSwitch && s.t[k] >= ts - sideS; k--) {
			if (s.ok[k]) {
				before.t.push(s.t[k]);
				before.x.push(s.x[k]);
			}
		}
		before.t.reverse();
		before.x.reverse();
		for (let k = k0; k < nextSwitch && s.t[k] <= ts + settleS + sideS; k++) {
			if (s.ok[k]) {
				after.t.push(s.t[k]);
				after.x.push(s.x[k]);
			}
		}
		const step = estimateCurrentStep(ts, ia, ib, before, after);
		// a step whose fit is poor (a fast part of the run) says nothing about self-heating
		if (step && Math.abs(step.stepKelvin) < 0.05) out.push(step);
	});
	return out;
}

function zeroCurrent(s: RunSeries, k: number | null): Float64Array {
	const y = new Float64Array(s.x.length);
	for (let j = 0; j < y.length; j++) y[j] = k === null || Number.isNaN(s.i[j]) ? s.x[j] : s.x[j] - k * s.i[j] * s.i[j];
	return y;
}

function addSelfHeating(y: Float64Array, s: RunSeries, k: number, lowI: number): Float64Array {
	const out = new Float64Array(y.length);
	for (let j = 0; j < y.length; j++) out[j] = y[j] + k * lowI * lowI;
	void s;
	return out;
}

function minCurrent(s: RunSeries): number | null {
	let m = Infinity;
	for (const i of s.i) if (i < m) m = i;
	return Number.isFinite(m) ? m : null;
}

function meanSquareCurrent(s: RunSeries, a: number, b: number): number {
	let c = 0;
	let sum = 0;
	for (let k = a; k < b; k++) {
		if (!s.ok[k] || Number.isNaN(s.i[k])) continue;
		c++;
		sum += s.i[k] * s.i[k];
	}
	return c ? sum / c : NaN;
}

const CURVE_POINTS = 200;

function decimatedFraction(s: RunSeries, y: Float64Array, start: number, end: number, liquidOf: (f: number) => number): FractionPoint[] {
	const out: FractionPoint[] = [];
	const span = end - start;
	const width = span / CURVE_POINTS;
	let j = indexAtOrAfter(s.t, start);
	for (let b = 0; b < CURVE_POINTS; b++) {
		const hi = start + (b + 1) * width;
		let c = 0, st = 0, sy = 0;
		for (; j < s.t.length && s.t[j] < hi; j++) {
			if (!s.ok[j]) continue;
			c++;
			st += s.t[j];
			sy += y[j];
		}
		if (!c) continue;
		const t = st / c;
		const f = Math.min(Math.max((t - start) / span, 0), 1);
		const liquid = liquidOf(f);
		out.push({ t, fraction: f, liquidFraction: liquid, inverseLiquidFraction: liquid > 0 ? 1 / liquid : 0, kelvin: sy / c });
	}
	// 1/F is unbounded at F → 0; keep the JSON finite
	return out.filter((p) => p.liquidFraction > 0);
}

/** Least squares of T against 1/F over a transformation-fraction window (block means, AR(1)-widened). */
function raoultFit(
	s: RunSeries,
	y: Float64Array,
	start: number,
	duration: number,
	liquidOf: (f: number) => number,
	window: [number, number],
	blockS: number
): RaoultFit | null {
	const a = indexAtOrAfter(s.t, start + window[0] * duration);
	const b = indexAtOrAfter(s.t, start + window[1] * duration);
	const inv: number[] = [];
	const val: number[] = [];
	let key = -1;
	let c = 0, st = 0, sy = 0;
	const flush = () => {
		if (c) {
			const f = liquidOf((st / c - start) / duration);
			if (f > 0) {
				inv.push(1 / f);
				val.push(sy / c);
			}
		}
		c = st = sy = 0;
	};
	for (let k = a; k < b; k++) {
		if (!s.ok[k]) continue;
		const kk = Math.floor((s.t[k] - start) / blockS);
		if (kk !== key) {
			flush();
			key = kk;
		}
		c++;
		st += s.t[k];
		sy += y[k];
	}
	flush();
	if (inv.length < 8) return null;
	// sort by 1/F so that the lag-1 correlation is taken between neighbours in time either way
	const order = inv.map((_, i) => i).sort((p, q) => inv[p] - inv[q]);
	const fit = fitLinearModel(order, (i) => [1, inv[i]], val);
	if (!fit) return null;
	void fitLine;
	return {
		slopeMilliKelvin: fit.coef[1] * 1000,
		slopeStdErrMilliKelvin: fit.stdErr[1] * 1000,
		pureKelvin: fit.coef[0],
		fractionFrom: window[0],
		fractionTo: window[1],
		n: fit.n
	};
}

export type { BlockedLine };
export { finiteOrNull };
