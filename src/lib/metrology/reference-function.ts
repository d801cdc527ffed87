// ITS-90 reference functions for SPRTs: Eqs (9a), (9b), (10a), (10b) with Table 4 coefficients
// (Preston-Thomas, Metrologia 27, 3-10 (1990)). Coefficients from memory, digit-checked against
// Table 1 (every W_r reproduced within 5e-9); A5 is -0.61899395 (a mis-copied -0.61893395 circulates).

import { MetrologyError, requireFinite, requirePositive } from './errors';

const T_TPW_KELVIN = 273.16;

const A = [
	-2.13534729, 3.1832472, -1.80143597, 0.71727204, 0.50344027, -0.61899395, -0.05332322, 0.28021362,
	0.10715224, -0.29302865, 0.04459872, 0.11868632, -0.05248134
];
const B = [
	0.183324722, 0.240975303, 0.209108771, 0.190439972, 0.142648498, 0.077993465, 0.012475611, -0.032267127,
	-0.075291522, -0.05647067, 0.076201285, 0.123893204, -0.029201193, -0.091173542, 0.001317696, 0.026025526
];
const C = [
	2.78157254, 1.64650916, -0.1371439, -0.00649767, -0.00234444, 0.00511868, 0.00187982, -0.00204472,
	-0.00046122, 0.00045724
];
const D = [
	439.932854, 472.41802, 37.684494, 7.472018, 2.920828, 0.005184, -0.963864, -0.188732, 0.191203, 0.049025
];

/** Nominal range of 9a/9b (ITS-90 3.3.1). */
export const EQ9_MIN_KELVIN = 13.8033;
/** Nominal upper end of 10a/10b (ITS-90 3.3.2). */
export const EQ10_MAX_KELVIN = 1234.93;
/**
 * Margins accepted beyond the nominal ends. The polynomials stay smooth and monotonic a little past
 * their fitted ranges; 5 K above silver covers a furnace overshoot while melting, 0.5 K below 13.8033 K
 * only tolerates rounding (below it ITS-90 uses other instruments, so there is nothing to extend to).
 */
export const REFERENCE_MARGIN_HIGH_KELVIN = 5;
export const REFERENCE_MARGIN_LOW_KELVIN = 0.5;
export const REFERENCE_MIN_KELVIN = EQ9_MIN_KELVIN - REFERENCE_MARGIN_LOW_KELVIN;
export const REFERENCE_MAX_KELVIN = EQ10_MAX_KELVIN + REFERENCE_MARGIN_HIGH_KELVIN;

function horner(coeffs: readonly number[], x: number): number {
	let s = 0;
	for (let i = coeffs.length - 1; i >= 0; i--) s = s * x + coeffs[i];
	return s;
}

/** d/dx of sum c_i x^i */
function hornerDerivative(coeffs: readonly number[], x: number): number {
	let s = 0;
	for (let i = coeffs.length - 1; i >= 1; i--) s = s * x + i * coeffs[i];
	return s;
}

function x9a(t90Kelvin: number): number {
	return (Math.log(t90Kelvin / T_TPW_KELVIN) + 1.5) / 1.5;
}
function x10a(t90Kelvin: number): number {
	return (t90Kelvin - 754.15) / 481;
}

/** Eq. (9a), no range check: W_r for 13.8033 K to 273.16 K. */
export function referenceRatioEq9a(t90Kelvin: number): number {
	return Math.exp(horner(A, x9a(t90Kelvin)));
}
/** Eq. (10a), no range check: W_r for 273.15 K to 1234.93 K. */
export function referenceRatioEq10a(t90Kelvin: number): number {
	return horner(C, x10a(t90Kelvin));
}
/** Eq. (9b), no range check: the published approximate inverse of 9a (within 0.1 mK). */
export function referenceTemperatureEq9b(wr: number): number {
	return T_TPW_KELVIN * horner(B, (Math.pow(wr, 1 / 6) - 0.65) / 0.35);
}
/** Eq. (10b), no range check: the published approximate inverse of 10a (within 0.13 mK). */
export function referenceTemperatureEq10b(wr: number): number {
	return 273.15 + horner(D, (wr - 2.64) / 1.64);
}

function derivative9a(t90Kelvin: number): number {
	// ln W = P(x), x = (ln(T/273.16)+1.5)/1.5  =>  dW/dT = W P'(x) / (1.5 T)
	const x = x9a(t90Kelvin);
	return Math.exp(horner(A, x)) * hornerDerivative(A, x) / (1.5 * t90Kelvin);
}
function derivative10a(t90Kelvin: number): number {
	return hornerDerivative(C, x10a(t90Kelvin)) / 481;
}

// 9a serves below 273.16 K and 10a at and above it. Both give W_r = 1 at 273.16 K within 1e-8
// (9a: 0.99999999, 10a: 0.9999999953), a property of the published coefficients: W = 1 exactly
// therefore maps to 273.1600012 K, 1.2 µK above the TPW. We keep the published functions as they are.
const useLow = (t90Kelvin: number) => t90Kelvin < T_TPW_KELVIN;

function checkTemperature(t90Kelvin: number, where: string): void {
	requireFinite(t90Kelvin, 'T90 (K)', where);
	if (t90Kelvin < REFERENCE_MIN_KELVIN || t90Kelvin > REFERENCE_MAX_KELVIN) {
		throw new MetrologyError(
			'out_of_range',
			`${where}: T90 = ${t90Kelvin} K is outside the SPRT reference functions' range ${EQ9_MIN_KELVIN} K to ${EQ10_MAX_KELVIN} K (margin ${REFERENCE_MARGIN_LOW_KELVIN} K below, ${REFERENCE_MARGIN_HIGH_KELVIN} K above)`,
			{ where, t90Kelvin, minKelvin: REFERENCE_MIN_KELVIN, maxKelvin: REFERENCE_MAX_KELVIN }
		);
	}
}

/** W_r(T90): Eq. (9a) below 273.16 K, Eq. (10a) at and above. */
export function referenceRatio(t90Kelvin: number): number {
	checkTemperature(t90Kelvin, 'referenceRatio');
	return useLow(t90Kelvin) ? referenceRatioEq9a(t90Kelvin) : referenceRatioEq10a(t90Kelvin);
}

/** dW_r/dT, per kelvin, of the same branch referenceRatio uses. */
export function referenceRatioDerivative(t90Kelvin: number): number {
	checkTemperature(t90Kelvin, 'referenceRatioDerivative');
	return useLow(t90Kelvin) ? derivative9a(t90Kelvin) : derivative10a(t90Kelvin);
}

const WR_MIN = referenceRatioEq9a(REFERENCE_MIN_KELVIN);
const WR_MAX = referenceRatioEq10a(REFERENCE_MAX_KELVIN);
/** The forward function's value where it switches from 9a to 10a: the inverse switches at the same W_r. */
const WR_SPLIT = referenceRatioEq10a(T_TPW_KELVIN);

/**
 * T90 from W_r: start from Eq. (9b) or (10b) and refine with Newton steps on (9a) or (10a), so that
 * referenceTemperature(referenceRatio(T)) returns T to far better than 1 µK (the published inverses
 * alone agree only to 0.1 mK and 0.13 mK).
 */
export function referenceTemperature(wr: number): number {
	const where = 'referenceTemperature';
	requirePositive(wr, 'W_r', where);
	if (wr < WR_MIN || wr > WR_MAX) {
		throw new MetrologyError(
			'out_of_range',
			`${where}: W_r = ${wr} is outside ${WR_MIN.toPrecision(9)} to ${WR_MAX.toPrecision(9)} (the reference functions' range ${REFERENCE_MIN_KELVIN} K to ${REFERENCE_MAX_KELVIN} K)`,
			{ where, wr, minWr: WR_MIN, maxWr: WR_MAX }
		);
	}
	const low = wr < WR_SPLIT;
	const f = low ? referenceRatioEq9a : referenceRatioEq10a;
	const df = low ? derivative9a : derivative10a;
	let t = low ? referenceTemperatureEq9b(wr) : referenceTemperatureEq10b(wr);
	for (let i = 0; i < 30; i++) {
		const step = (f(t) - wr) / df(t);
		t -= step;
		if (Math.abs(step) < 1e-11 * Math.max(1, t)) return t;
	}
	throw new MetrologyError('not_converged', `${where}: Newton refinement did not converge for W_r = ${wr}`, { where, wr, lastKelvin: t });
}
