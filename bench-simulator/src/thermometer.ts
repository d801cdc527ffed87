// The SPRT: its own R_TPW and deviation function (so its W differs from W_r as a real one does)
// and self-heating proportional to I². The ITS-90 maths is the metrology core's, not ours.

import { ratioFromTemperature, withAluminiumRatio, type DeviationCoefficients, type SubrangeId } from '../../src/lib/metrology/index';

export interface Thermometer {
	serial: string;
	rTpwOhm: number;
	subrange: SubrangeId;
	coefficients: DeviationCoefficients;
	/** Self-heating at 1 mA in the cell it is measuring, mK (depends on the point's heat transfer). */
	selfHeatingMilliKelvinAt1mA: number;
}

/** Fills in wAl for the Ag sub-range, whose d-term needs the thermometer's own W(Al). */
export function completeCoefficients(subrange: SubrangeId, k: DeviationCoefficients): DeviationCoefficients {
	return subrange === 'TPW-Sn-Zn-Al-Ag' && k.wAl === undefined ? withAluminiumRatio(k) : k;
}

export function selfHeatingKelvin(th: Thermometer, currentMilliAmp: number): number {
	return th.selfHeatingMilliKelvinAt1mA * 1e-3 * currentMilliAmp * currentMilliAmp;
}

/** Resistance of the element at its own (already self-heated) temperature, ohm. */
export function elementResistanceOhm(th: Thermometer, elementKelvin: number): number {
	return th.rTpwOhm * ratioFromTemperature(elementKelvin, th.subrange, th.coefficients);
}

/** dR/dT near a temperature, ohm per kelvin: turns temperature-equivalent noise into ohms. */
export function resistanceSlopeOhmPerKelvin(th: Thermometer, nearKelvin: number): number {
	const h = 1e-3;
	return (elementResistanceOhm(th, nearKelvin + h) - elementResistanceOhm(th, nearKelvin - h)) / (2 * h);
}

/** Measuring-current schedule: low current, with a step to the high current every so often
 *  (common practice: 1 mA and √2 mA so the zero-current value can be extrapolated). */
export interface CurrentSchedule {
	lowCurrentMilliAmp: number;
	highCurrentMilliAmp: number;
	highCurrentFirstAtMinutes: number;
	highCurrentEveryMinutes: number;
	highCurrentForMinutes: number;
}

export function currentAt(s: CurrentSchedule, elapsedS: number): number {
	const m = elapsedS / 60 - s.highCurrentFirstAtMinutes;
	if (m < 0 || s.highCurrentForMinutes <= 0) return s.lowCurrentMilliAmp;
	const within = s.highCurrentEveryMinutes > 0 ? m % s.highCurrentEveryMinutes : m;
	return within < s.highCurrentForMinutes ? s.highCurrentMilliAmp : s.lowCurrentMilliAmp;
}
