// SPRT deviation functions ΔW(W) = W − W_r per sub-range (ITS-90 section 3.3, Eqs 10 and 12; formula
// forms from memory, see equations.ts), their fitting at the calibration points, and T90 from W.

import { MetrologyError, requireFinite, requirePositive } from './errors';
import { fixedPoint, isFixedPointId } from './fixed-points';
import { solveLinearSystem } from './linear-algebra';
import { referenceRatio, referenceRatioDerivative, referenceTemperature, REFERENCE_MAX_KELVIN, REFERENCE_MIN_KELVIN } from './reference-function';
import type { DeviationCoefficients, FixedPointId, Subrange, SubrangeId } from './types';

type Term = 'a' | 'b' | 'c' | 'd';

interface SubrangeDef extends Subrange {
	terms: Term[];
	/** true for the Ar–Hg–TPW form a(W−1) + b(W−1)lnW */
	logForm: boolean;
}

const def = (id: SubrangeId, points: FixedPointId[], minKelvin: number, maxKelvin: number, terms: Term[], logForm = false): SubrangeDef =>
	Object.freeze({ id, points: Object.freeze(points) as FixedPointId[], minKelvin, maxKelvin, terms: Object.freeze(terms) as Term[], logForm });

// Ranges and calibration points: ITS-90 section 3.3.1 and 3.3.2 (as in its90-data.md, Table 5).
const DEFS: ReadonlyMap<SubrangeId, SubrangeDef> = new Map(
	[
		def('Ar-Hg-TPW', ['Ar', 'Hg', 'TPW'], 83.8058, 273.16, ['a', 'b'], true),
		def('Hg-TPW-Ga', ['Hg', 'TPW', 'Ga'], 234.3156, 302.9146, ['a', 'b']),
		def('TPW-Ga', ['TPW', 'Ga'], 273.15, 302.9146, ['a']),
		def('TPW-In', ['TPW', 'In'], 273.15, 429.7485, ['a']),
		def('TPW-In-Sn', ['TPW', 'In', 'Sn'], 273.15, 505.078, ['a', 'b']),
		def('TPW-Sn-Zn', ['TPW', 'Sn', 'Zn'], 273.15, 692.677, ['a', 'b']),
		def('TPW-Sn-Zn-Al', ['TPW', 'Sn', 'Zn', 'Al'], 273.15, 933.473, ['a', 'b', 'c']),
		def('TPW-Sn-Zn-Al-Ag', ['TPW', 'Sn', 'Zn', 'Al', 'Ag'], 273.15, 1234.93, ['a', 'b', 'c', 'd'])
	].map((d) => [d.id, d])
);

export const SUBRANGE_IDS: readonly SubrangeId[] = Object.freeze([...DEFS.keys()]);

/**
 * ITS-90 does not sanction extrapolating a deviation function. We still reduce readings up to 5 K
 * beyond a sub-range's ends, because a cell's approach to its plateau (furnace set a few kelvin off,
 * noise at the Ar end) must be displayed rather than rejected; beyond that the call throws.
 */
export const SUBRANGE_MARGIN_KELVIN = 5;

function getDef(id: SubrangeId, where: string): SubrangeDef {
	const d = DEFS.get(id);
	if (!d) {
		throw new MetrologyError('unknown_id', `${where}: unknown sub-range '${String(id)}' (expected one of ${[...DEFS.keys()].join(', ')})`, { where, subrange: id });
	}
	return d;
}

export function subrange(id: SubrangeId): Subrange {
	const d = getDef(id, 'subrange');
	return { id: d.id, points: [...d.points], minKelvin: d.minKelvin, maxKelvin: d.maxKelvin, terms: [...d.terms] };
}

interface Coeffs {
	a: number;
	b: number;
	c: number;
	d: number;
	wAl: number;
}

function readCoefficients(d: SubrangeDef, k: DeviationCoefficients, where: string): Coeffs {
	if (k === null || typeof k !== 'object') {
		throw new MetrologyError('invalid_input', `${where}: deviation coefficients must be an object`, { where });
	}
	for (const term of d.terms) requireFinite(k[term] as number, `coefficient ${term} of sub-range ${d.id}`, where);
	const hasD = d.terms.includes('d');
	if (hasD) requirePositive(k.wAl as number, `wAl (the thermometer's W at the Al point) for sub-range ${d.id}`, where);
	const used = (t: Term) => (d.terms.includes(t) ? (k[t] as number) : 0);
	return { a: used('a'), b: used('b'), c: used('c'), d: used('d'), wAl: hasD ? (k.wAl as number) : Infinity };
}

function checkW(w: number, what: string, where: string): void {
	requireFinite(w, what, where);
	if (w <= 0) throw new MetrologyError('invalid_input', `${where}: ${what} must be > 0 (W = R/R_TPW), got ${w}`, { where, w });
}

function evaluate(d: SubrangeDef, k: Coeffs, w: number): number {
	const x = w - 1;
	if (d.logForm) return k.a * x + k.b * x * Math.log(w);
	let s = k.a * x + k.b * x * x + k.c * x * x * x;
	// The d-term applies only above the Al point: below it a, b, c alone (ITS-90 3.3.2).
	if (w > k.wAl) s += k.d * (w - k.wAl) * (w - k.wAl);
	return s;
}

function slope(d: SubrangeDef, k: Coeffs, w: number): number {
	const x = w - 1;
	if (d.logForm) return k.a + k.b * (Math.log(w) + x / w);
	let s = k.a + 2 * k.b * x + 3 * k.c * x * x;
	if (w > k.wAl) s += 2 * k.d * (w - k.wAl);
	return s;
}

/** ΔW at the thermometer's measured W. */
export function deviation(subrangeId: SubrangeId, k: DeviationCoefficients, w: number): number {
	const where = 'deviation';
	const d = getDef(subrangeId, where);
	checkW(w, 'W', where);
	return evaluate(d, readCoefficients(d, k, where), w);
}

/** dΔW/dW at measured W. */
export function deviationSlope(subrangeId: SubrangeId, k: DeviationCoefficients, w: number): number {
	const where = 'deviationSlope';
	const d = getDef(subrangeId, where);
	checkW(w, 'W', where);
	return slope(d, readCoefficients(d, k, where), w);
}

function basis(d: SubrangeDef, w: number): number[] {
	const x = w - 1;
	if (d.logForm) return [x, x * Math.log(w)];
	return [x, x * x, x * x * x].slice(0, Math.min(3, d.terms.length));
}

/**
 * Coefficients from the thermometer's W at each calibration point: W_i − W_r(T_i) = ΔW(W_i) exactly.
 * TPW may be omitted (W = 1 there by definition, where every ΔW vanishes); if given, its W must be 1.
 * For 'TPW-Sn-Zn-Al-Ag', a, b, c come from Sn, Zn, Al and d from Ag (ITS-90 3.3.2).
 */
export function fitDeviation(subrangeId: SubrangeId, points: { point: FixedPointId; w: number }[]): DeviationCoefficients {
	const where = 'fitDeviation';
	const d = getDef(subrangeId, where);
	if (!Array.isArray(points)) throw new MetrologyError('invalid_input', `${where}: points must be an array`, { where });
	const byPoint = new Map<FixedPointId, number>();
	for (const p of points) {
		if (!isFixedPointId(p?.point)) {
			throw new MetrologyError('unknown_id', `${where}: unknown fixed point id '${String(p?.point)}'`, { where, point: p?.point });
		}
		if (!d.points.includes(p.point)) {
			throw new MetrologyError('invalid_input', `${where}: ${p.point} is not a calibration point of sub-range ${d.id} (${d.points.join(', ')})`, { where, point: p.point, subrange: d.id });
		}
		if (byPoint.has(p.point)) {
			throw new MetrologyError('invalid_input', `${where}: ${p.point} given twice; average the runs first`, { where, point: p.point });
		}
		checkW(p.w, `W at ${p.point}`, where);
		byPoint.set(p.point, p.w);
	}
	const tpw = byPoint.get('TPW');
	if (tpw !== undefined && Math.abs(tpw - 1) > 1e-12) {
		throw new MetrologyError('invalid_input', `${where}: W at TPW is 1 by definition (W = R/R_TPW), got ${tpw}`, { where, w: tpw });
	}
	const needed = d.points.filter((p) => p !== 'TPW');
	const missing = needed.filter((p) => !byPoint.has(p));
	if (missing.length > 0) {
		throw new MetrologyError('missing_point', `${where}: sub-range ${d.id} needs W at ${missing.join(', ')}`, { where, subrange: d.id, missing });
	}
	const w = (p: FixedPointId) => byPoint.get(p) as number;
	const target = (p: FixedPointId) => w(p) - referenceRatio(fixedPoint(p).t90);

	const linearPoints = d.terms.includes('d') ? needed.filter((p) => p !== 'Ag') : needed;
	const solution = solveLinearSystem(
		linearPoints.map((p) => basis(d, w(p))),
		linearPoints.map(target)
	);
	const result: DeviationCoefficients = { a: solution[0] };
	if (d.terms.includes('b')) result.b = solution[1];
	if (d.terms.includes('c')) result.c = solution[2];
	if (d.terms.includes('d')) {
		const wAl = w('Al');
		const wAg = w('Ag');
		if (!(wAg > wAl)) {
			throw new MetrologyError('invalid_input', `${where}: W at Ag (${wAg}) must exceed W at Al (${wAl})`, { where, wAl, wAg });
		}
		const below = evaluate(d, { a: result.a, b: result.b ?? 0, c: result.c ?? 0, d: 0, wAl }, wAg);
		result.d = (target('Ag') - below) / ((wAg - wAl) * (wAg - wAl));
		result.wAl = wAl;
	}
	return result;
}

function checkSubrangeTemperature(d: SubrangeDef, t90Kelvin: number, where: string): void {
	requireFinite(t90Kelvin, 'T90 (K)', where);
	const min = Math.max(REFERENCE_MIN_KELVIN, d.minKelvin - SUBRANGE_MARGIN_KELVIN);
	const max = Math.min(REFERENCE_MAX_KELVIN, d.maxKelvin + SUBRANGE_MARGIN_KELVIN);
	if (t90Kelvin < min || t90Kelvin > max) {
		throw new MetrologyError(
			'out_of_range',
			`${where}: T90 = ${t90Kelvin.toFixed(4)} K is outside sub-range ${d.id} (${d.minKelvin} K to ${d.maxKelvin} K, ${SUBRANGE_MARGIN_KELVIN} K margin allowed)`,
			{ where, subrange: d.id, t90Kelvin, minKelvin: d.minKelvin, maxKelvin: d.maxKelvin, marginKelvin: SUBRANGE_MARGIN_KELVIN }
		);
	}
}

/** T90 in kelvin from the thermometer's W: W_r = W − ΔW(W), then the reference inverse. */
export function temperatureFromRatio(w: number, subrangeId: SubrangeId, k: DeviationCoefficients): number {
	const where = 'temperatureFromRatio';
	const d = getDef(subrangeId, where);
	return t90FromW(d, readCoefficients(d, k, where), w, where);
}

/**
 * A thermometer's deviation function with its coefficients checked once, for converting many readings
 * (the live reduction meets every reading of every run; checking the coefficients each time cost it
 * about a tenth of its time). Opaque: made by prepareDeviation, used by temperatureFromPreparedRatio.
 */
export interface PreparedDeviation {
	readonly subrangeId: SubrangeId;
	readonly def: SubrangeDef;
	readonly coefficients: Readonly<Coeffs>;
}

/** Checks the coefficients for the sub-range (throws as temperatureFromRatio would) and keeps a copy. */
export function prepareDeviation(subrangeId: SubrangeId, k: DeviationCoefficients): PreparedDeviation {
	const where = 'prepareDeviation';
	const d = getDef(subrangeId, where);
	return Object.freeze({ subrangeId, def: d, coefficients: Object.freeze(readCoefficients(d, k, where)) });
}

/** temperatureFromRatio with prepared coefficients: the same arithmetic, the same errors for W. */
export function temperatureFromPreparedRatio(w: number, p: PreparedDeviation): number {
	return t90FromW(p.def, p.coefficients, w, 'temperatureFromRatio');
}

function t90FromW(d: SubrangeDef, c: Coeffs, w: number, where: string): number {
	checkW(w, 'W', where);
	const wr = w - evaluate(d, c, w);
	let t: number;
	try {
		t = referenceTemperature(wr);
	} catch (e) {
		if (e instanceof MetrologyError && e.code === 'out_of_range') {
			throw new MetrologyError('out_of_range', `${where}: W = ${w} gives W_r = ${wr}, outside the reference function (sub-range ${d.id})`, { where, w, wr, subrange: d.id });
		}
		throw e;
	}
	checkSubrangeTemperature(d, t, where);
	return t;
}

/** The thermometer's W at T90: Newton's method on W − ΔW(W) = W_r(T90), starting from W_r. */
export function ratioFromTemperature(t90Kelvin: number, subrangeId: SubrangeId, k: DeviationCoefficients): number {
	const where = 'ratioFromTemperature';
	const d = getDef(subrangeId, where);
	checkSubrangeTemperature(d, t90Kelvin, where);
	const c = readCoefficients(d, k, where);
	const wr = referenceRatio(t90Kelvin);
	let w = wr;
	for (let i = 0; i < 50; i++) {
		const g = 1 - slope(d, c, w);
		if (!(Math.abs(g) > 1e-6)) break;
		const step = (w - evaluate(d, c, w) - wr) / g;
		w -= step;
		if (!(w > 0)) break;
		if (Math.abs(step) < 1e-15 * w) return w;
	}
	throw new MetrologyError('not_converged', `${where}: could not solve W − ΔW(W) = W_r at ${t90Kelvin} K for sub-range ${d.id}; check the coefficients`, { where, t90Kelvin, subrange: d.id });
}

/** Sensitivity dT90/dW in kelvin per unit W, at the thermometer's measured W (analytic). */
export function dTdW(w: number, subrangeId: SubrangeId, k: DeviationCoefficients): number {
	const where = 'dTdW';
	const d = getDef(subrangeId, where);
	const t = temperatureFromRatio(w, subrangeId, k);
	// T = T_r(W − ΔW(W))  =>  dT/dW = (1 − ΔW'(W)) / (dW_r/dT)
	return (1 - slope(d, readCoefficients(d, k, where), w)) / referenceRatioDerivative(t);
}

/**
 * Completes 'TPW-Sn-Zn-Al-Ag' coefficients with wAl: the W at which the a, b, c part gives the Al
 * point. Lets a simulator pick a, b, c, d freely and get a consistent thermometer.
 */
export function withAluminiumRatio(k: DeviationCoefficients): DeviationCoefficients {
	const { d: _d, wAl: _w, ...abc } = k;
	const wAl = ratioFromTemperature(fixedPoint('Al').t90, 'TPW-Sn-Zn-Al', abc);
	return { ...k, wAl };
}
