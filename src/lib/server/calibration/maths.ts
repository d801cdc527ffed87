// The maths of one SPRT calibration from fixed-point values: deviation coefficients, residuals at the
// calibration points, the propagation of each point's uncertainty to the whole range, and the table.
// Pure: no I/O, so it is tested on its own and used by the pages, the stored version and the report.
import {
	deviation,
	dTdW,
	fitDeviation,
	fixedPoint,
	ratioFromTemperature,
	referenceRatio,
	referenceRatioDerivative,
	subrange,
	temperatureFromRatio,
	type DeviationCoefficients,
	type FixedPointId,
	type SubrangeId
} from '../../metrology/index';

/** The thermometer's measured W at one calibration point and its standard uncertainty there. */
export interface PointValue {
	point: FixedPointId;
	w: number;
	/** standard uncertainty of the realized value at the sensor, mK (the run's combined budget) */
	uMilliKelvin: number;
}

export interface CalibrationInput {
	subrange: SubrangeId;
	/** every calibration point of the sub-range except TPW (W = 1 there by definition) */
	points: PointValue[];
	/** standard uncertainty of the TPW realization behind R_TPW, mK */
	uTpwMilliKelvin: number;
}

export interface Residual {
	point: FixedPointId;
	w: number;
	wr: number;
	deviation: number;
	/** W − W_r(T90) − ΔW(W): zero by construction (the fit passes through every point) */
	residualW: number;
	/** T90 from the fitted function at the measured W minus the assigned T90, mK */
	residualMilliKelvin: number;
}

export interface PropagatedComponent {
	/** 'Sn', 'Zn', …, or 'TPW' (through R_TPW) */
	source: string;
	/** |∂T/∂x| × u(x), mK */
	uMilliKelvin: number;
}

export interface Propagated {
	t90Kelvin: number;
	components: PropagatedComponent[];
	combinedMilliKelvin: number;
	expandedMilliKelvin: number;
}

export interface TableRow {
	t90Celsius: number;
	t90Kelvin: number;
	w: number;
	wr: number;
	deviation: number;
	resistanceOhm: number;
	/** dR/dT of this thermometer, Ω/K */
	ohmPerKelvin: number;
	uMilliKelvin: number | null;
	expandedMilliKelvin: number | null;
	/** a calibration point's symbol, when the row is one */
	point: FixedPointId | null;
}

export const COVERAGE_FACTOR = 2;

/** u(W) at a point from u(T): u(W) = u(T) · dW/dT of this thermometer there. */
export function uW(p: PointValue, subrangeId: SubrangeId, k: DeviationCoefficients): number {
	return (p.uMilliKelvin / 1000) / dTdW(p.w, subrangeId, k);
}

export function fitCalibration(input: CalibrationInput): { coefficients: DeviationCoefficients; residuals: Residual[] } {
	const coefficients = fitDeviation(input.subrange, input.points.map(({ point, w }) => ({ point, w })));
	return { coefficients, residuals: residualsOf(input.subrange, coefficients, input.points) };
}

/** What the coefficients leave at each calibration point (TPW included, W = 1 there). */
export function residualsOf(subrangeId: SubrangeId, k: DeviationCoefficients, points: { point: FixedPointId; w: number }[]): Residual[] {
	const tpw: Residual = { point: 'TPW', w: 1, wr: 1, deviation: 0, residualW: 0, residualMilliKelvin: 0 };
	// At the TPW, W = 1 and W_r = 1 by definition (Table 1), and every ΔW vanishes: zero, not a computation
	// (Eq. 9a itself gives W_r(273.16 K) = 1 − 4.7e-9, the reference function's own rounding).
	return [tpw, ...points.filter((p) => p.point !== 'TPW').map(({ point, w }) => {
		const t90 = fixedPoint(point).t90;
		const wr = referenceRatio(t90);
		const dw = deviation(subrangeId, k, w);
		return { point, w, wr, deviation: dw, residualW: w - wr - dw, residualMilliKelvin: (temperatureFromRatio(w, subrangeId, k) - t90) * 1000 };
	})];
}

/**
 * Standard uncertainty of T90 at `t90Kelvin` propagated from the calibration. For each fixed point the
 * W measured there is moved by its u(W), the coefficients refitted, and the change of T90 at the W the
 * thermometer reads at `t90Kelvin` taken as that point's contribution (the model is linear at this
 * scale, so one-sided differences of one u are exact enough). R_TPW is moved by the relative amount a
 * TPW error of u_TPW makes (dR/R = dW_r/dT · u at 273.16 K): it scales every calibration W at once. The
 * points are taken as uncorrelated (separate cells, runs and days); the contributions add in quadrature.
 * In use the thermometer's own R_TPW is measured again, so the reading at T is not moved by it.
 */
export function propagate(input: CalibrationInput, k: DeviationCoefficients, t90Kelvin: number): Propagated {
	const sub = input.subrange;
	const wAtT = ratioFromTemperature(t90Kelvin, sub, k);
	const base = input.points.map(({ point, w }) => ({ point, w }));
	// The thermometer reads wAtT; a refit moves ΔW there by δ, and T90 by −δ / (dW_r/dT) (first order,
	// which also keeps clear of the step between Eqs 9 and 10 right at the TPW). Differences are taken
	// against the refit of the unmoved points, so k need not be that refit's own digits.
	const dWrdT = referenceRatioDerivative(t90Kelvin);
	const d0 = deviation(sub, fitDeviation(sub, base), wAtT);
	const shiftMilliKelvin = (points: { point: FixedPointId; w: number }[]) => (Math.abs(deviation(sub, fitDeviation(sub, points), wAtT) - d0) / dWrdT) * 1000;
	const components: PropagatedComponent[] = input.points.map((p, i) => {
		const du = uW(p, sub, k);
		return { source: p.point, uMilliKelvin: shiftMilliKelvin(base.map((b, j) => (j === i ? { ...b, w: b.w + du } : b))) };
	});
	const epsilon = (input.uTpwMilliKelvin / 1000) * referenceRatioDerivative(fixedPoint('TPW').t90);
	components.push({ source: 'TPW', uMilliKelvin: shiftMilliKelvin(base.map((b) => ({ ...b, w: b.w / (1 + epsilon) }))) });
	const combined = Math.sqrt(components.reduce((s, c) => s + c.uMilliKelvin ** 2, 0));
	return { t90Kelvin, components, combinedMilliKelvin: combined, expandedMilliKelvin: COVERAGE_FACTOR * combined };
}

/** Temperatures of the table: every `stepCelsius` across the sub-range, plus its calibration points. */
export function tableTemperatures(subrangeId: SubrangeId, stepCelsius: number): { t90Kelvin: number; point: FixedPointId | null }[] {
	const sr = subrange(subrangeId);
	const lo = sr.minKelvin - 273.15;
	const hi = sr.maxKelvin - 273.15;
	const out = new Map<string, { t90Kelvin: number; point: FixedPointId | null }>();
	const first = Math.ceil(lo / stepCelsius - 1e-9) * stepCelsius;
	for (let c = first; c <= hi + 1e-9; c += stepCelsius) out.set((c + 273.15).toFixed(4), { t90Kelvin: Math.round((c + 273.15) * 1e6) / 1e6, point: null });
	for (const p of sr.points) out.set(fixedPoint(p).t90.toFixed(4), { t90Kelvin: fixedPoint(p).t90, point: p });
	return [...out.values()].sort((a, b) => a.t90Kelvin - b.t90Kelvin);
}

/** The table at every step; u(T) columns only when the calibration's point values are known (`input`). */
export function calibrationTable(subrangeId: SubrangeId, k: DeviationCoefficients, rTpwOhm: number, stepCelsius: number, input: CalibrationInput | null): TableRow[] {
	return tableTemperatures(subrangeId, stepCelsius).map(({ t90Kelvin, point }) => {
		const w = ratioFromTemperature(t90Kelvin, subrangeId, k);
		const u = input ? propagate(input, k, t90Kelvin) : null;
		return {
			t90Celsius: t90Kelvin - 273.15,
			t90Kelvin,
			w,
			wr: referenceRatio(t90Kelvin),
			deviation: deviation(subrangeId, k, w),
			resistanceOhm: w * rTpwOhm,
			ohmPerKelvin: rTpwOhm / dTdW(w, subrangeId, k),
			uMilliKelvin: u ? u.combinedMilliKelvin : null,
			expandedMilliKelvin: u ? u.expandedMilliKelvin : null,
			point
		};
	});
}

/** The deviation curve ΔW(W) across the sub-range, for charts: n points evenly in T90. */
export function deviationCurve(subrangeId: SubrangeId, k: DeviationCoefficients, n = 120): { t90Celsius: number; deviation: number; deviationMilliKelvin: number }[] {
	const sr = subrange(subrangeId);
	const out: { t90Celsius: number; deviation: number; deviationMilliKelvin: number }[] = [];
	for (let i = 0; i <= n; i++) {
		const t = sr.minKelvin + ((sr.maxKelvin - sr.minKelvin) * i) / n;
		const w = ratioFromTemperature(t, subrangeId, k);
		const dw = deviation(subrangeId, k, w);
		// ΔW expressed as a temperature: ΔW / (dW_r/dT), what the deviation is worth in mK at T
		out.push({ t90Celsius: t - 273.15, deviation: dw, deviationMilliKelvin: (dw / referenceRatioDerivative(t)) * 1000 });
	}
	return out;
}
