// R_TPW stability of an SPRT: how far its resistance at the triple point of water moved, expressed as
// the temperature error it would cause. Pure: runs in the browser and on the server.
//
// Equivalent temperature of a change dR in R_TPW: dT = dR / (R_TPW · dW_r/dT), with dW_r/dT the slope of
// the ITS-90 reference function at 273.16 K (3.98853e-3 /K). Practice (NIST, Minor & Strouse, NCSLI 2005):
// R_TPW should repeat within the equivalent of 0.2 mK after a stabilisation cycle.
import { referenceRatioDerivative } from '../metrology';

/** dW_r/dT at the triple point of water, per kelvin, from the metrology core. */
export const TPW_REFERENCE_SLOPE_PER_KELVIN = referenceRatioDerivative(273.16);

/** Default limit when the lab has not set 'limits.rtpwShiftMilliKelvin'. */
export const DEFAULT_RTPW_LIMIT_MILLIKELVIN = 0.2;

/** Temperature equivalent, in mK, of a change of R_TPW by `deltaOhm` on a thermometer of `rTpwOhm`. */
export function rtpwEquivalentMilliKelvin(deltaOhm: number, rTpwOhm: number): number {
	if (!(rTpwOhm > 0)) throw new RangeError(`R_TPW must be positive, got ${rTpwOhm} Ω`);
	return (deltaOhm / (rTpwOhm * TPW_REFERENCE_SLOPE_PER_KELVIN)) * 1000;
}

/** The change of R_TPW, in Ω, that is equivalent to `milliKelvin` on a thermometer of `rTpwOhm`. */
export function rtpwOhmForMilliKelvin(milliKelvin: number, rTpwOhm: number): number {
	return (milliKelvin / 1000) * rTpwOhm * TPW_REFERENCE_SLOPE_PER_KELVIN;
}

export interface RtpwCheckInput {
	id: number;
	measuredAtMs: number;
	rTpwOhm: number;
}

export interface RtpwCheckAssessed extends RtpwCheckInput {
	/** Equivalent temperature of the change since the previous check (null for the first). */
	shiftFromPreviousMilliKelvin: number | null;
	/** Equivalent temperature of R_TPW − reference. */
	fromReferenceMilliKelvin: number;
	/** |shift from the previous check| exceeds the limit. */
	shiftExceedsLimit: boolean;
	/** |R_TPW − reference| exceeds the limit. */
	outsideBand: boolean;
}

export interface RtpwStability {
	referenceOhm: number;
	limitMilliKelvin: number;
	/** ± the limit as a resistance around the reference. */
	limitOhm: number;
	checks: RtpwCheckAssessed[];
	/** Pairs of consecutive checks whose difference exceeds the limit. */
	shifts: { fromId: number; toId: number; fromMs: number; toMs: number; milliKelvin: number }[];
	flagged: boolean;
}

/**
 * Orders the checks by time and compares each with the one before it and with the reference value
 * (usually the R_TPW the current calibration was computed with). A limit is "exceeded" when strictly
 * greater than it: a shift of exactly the limit passes.
 */
export function assessRtpwStability(input: readonly RtpwCheckInput[], referenceOhm: number, limitMilliKelvin: number): RtpwStability {
	if (!(limitMilliKelvin > 0)) throw new RangeError(`The R_TPW limit must be positive, got ${limitMilliKelvin} mK`);
	const sorted = [...input].sort((a, b) => a.measuredAtMs - b.measuredAtMs || a.id - b.id);
	const shifts: RtpwStability['shifts'] = [];
	const checks = sorted.map((c, i): RtpwCheckAssessed => {
		const prev = i > 0 ? sorted[i - 1] : null;
		// The shift is scaled by the earlier value: the thermometer as it was before it moved.
		const shift = prev ? rtpwEquivalentMilliKelvin(c.rTpwOhm - prev.rTpwOhm, prev.rTpwOhm) : null;
		const exceeds = shift !== null && Math.abs(shift) > limitMilliKelvin;
		if (exceeds && prev) shifts.push({ fromId: prev.id, toId: c.id, fromMs: prev.measuredAtMs, toMs: c.measuredAtMs, milliKelvin: shift! });
		const fromRef = rtpwEquivalentMilliKelvin(c.rTpwOhm - referenceOhm, referenceOhm);
		return { ...c, shiftFromPreviousMilliKelvin: shift, fromReferenceMilliKelvin: fromRef, shiftExceedsLimit: exceeds, outsideBand: Math.abs(fromRef) > limitMilliKelvin };
	});
	return { referenceOhm, limitMilliKelvin, limitOhm: rtpwOhmForMilliKelvin(limitMilliKelvin, referenceOhm), checks, shifts, flagged: shifts.length > 0 };
}
