// Self-heating: the SPRT dissipates I²R, so R rises with I² (common practice); R at zero current is
// extrapolated from two or more currents.

import { MetrologyError, requireFinite, requirePositive } from './errors';
import { dTdW } from './deviation';
import type { DeviationCoefficients, SubrangeId } from './types';

/**
 * R(0) from readings at any two currents, R = R0 + s I²: R0 = (r1 i2² − r2 i1²)/(i2² − i1²).
 * With i2 = √2 i1 this is the familiar 2R(I) − R(√2 I). Currents in any one unit.
 */
export function zeroCurrentResistance(r1: number, i1: number, r2: number, i2: number): number {
	const where = 'zeroCurrentResistance';
	requirePositive(r1, 'r1 (ohm)', where);
	requirePositive(r2, 'r2 (ohm)', where);
	requireFinite(i1, 'i1', where);
	requireFinite(i2, 'i2', where);
	const d = i2 * i2 - i1 * i1;
	if (!(Math.abs(d) > 1e-12 * Math.max(i1 * i1, i2 * i2)) || (i1 === 0 && i2 === 0)) {
		throw new MetrologyError('invalid_input', `${where}: the two currents must differ in magnitude (got ${i1} and ${i2})`, { where, i1, i2 });
	}
	return (r1 * i2 * i2 - r2 * i1 * i1) / d;
}

export interface ZeroCurrentFit {
	zeroCurrentOhm: number;
	slopeOhmPerMilliAmp2: number;
	/** standard error of the intercept; NaN with only two distinct currents (no residual freedom) */
	stdErrZeroOhm: number;
	degreesOfFreedom: number;
}

/** Least squares of R against I², intercept = R(0) with its standard error. */
export function zeroCurrentFit(points: { currentMilliAmp: number; resistanceOhm: number }[]): ZeroCurrentFit {
	const where = 'zeroCurrentFit';
	if (!Array.isArray(points) || points.length < 2) {
		throw new MetrologyError('invalid_input', `${where}: need readings at two or more currents`, { where });
	}
	for (const p of points) {
		requireFinite(p.currentMilliAmp, 'currentMilliAmp', where);
		requirePositive(p.resistanceOhm, 'resistanceOhm', where);
	}
	const n = points.length;
	const xs = points.map((p) => p.currentMilliAmp * p.currentMilliAmp);
	const ys = points.map((p) => p.resistanceOhm);
	const xMean = xs.reduce((s, x) => s + x, 0) / n;
	const yMean = ys.reduce((s, y) => s + y, 0) / n;
	let sxx = 0;
	let sxy = 0;
	for (let i = 0; i < n; i++) {
		sxx += (xs[i] - xMean) ** 2;
		sxy += (xs[i] - xMean) * (ys[i] - yMean);
	}
	if (!(sxx > 1e-12 * Math.max(1e-300, xMean * xMean))) {
		throw new MetrologyError('invalid_input', `${where}: need at least two distinct current magnitudes`, { where });
	}
	const slope = sxy / sxx;
	const intercept = yMean - slope * xMean;
	const dof = n - 2;
	let stdErr = Number.NaN;
	if (dof > 0) {
		let ss = 0;
		for (let i = 0; i < n; i++) ss += (ys[i] - intercept - slope * xs[i]) ** 2;
		stdErr = Math.sqrt(ss / dof) * Math.sqrt(1 / n + (xMean * xMean) / sxx);
	}
	return { zeroCurrentOhm: intercept, slopeOhmPerMilliAmp2: slope, stdErrZeroOhm: stdErr, degreesOfFreedom: dof };
}

/** Self-heating in kelvin at a measuring current: (R(I) − R(0))/R_TPW × dT/dW. */
export function selfHeatingKelvin(
	resistanceAtCurrentOhm: number,
	zeroCurrentOhm: number,
	rTpwOhm: number,
	subrangeId: SubrangeId,
	k: DeviationCoefficients
): number {
	const where = 'selfHeatingKelvin';
	requirePositive(resistanceAtCurrentOhm, 'resistance at the current (ohm)', where);
	requirePositive(zeroCurrentOhm, 'zero-current resistance (ohm)', where);
	requirePositive(rTpwOhm, 'R_TPW (ohm)', where);
	const w0 = zeroCurrentOhm / rTpwOhm;
	return ((resistanceAtCurrentOhm - zeroCurrentOhm) / rTpwOhm) * dTdW(w0, subrangeId, k);
}
