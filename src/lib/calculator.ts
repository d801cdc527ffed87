// The engineers' W ↔ T90 calculator: pure, runs in the browser on the metrology core.
import {
	MetrologyError,
	deviation,
	dTdW,
	ratioFromTemperature,
	referenceRatio,
	referenceRatioDerivative,
	referenceTemperature,
	temperatureFromRatio,
	type DeviationCoefficients,
	type SubrangeId
} from './metrology/index';

export type CalculatorInput =
	| { direction: 'w-to-t'; w: number; subrange: SubrangeId | null; coefficients: DeviationCoefficients }
	| { direction: 'r-to-t'; resistanceOhm: number; rTpwOhm: number; subrange: SubrangeId | null; coefficients: DeviationCoefficients }
	| { direction: 't-to-w'; t90Kelvin: number; subrange: SubrangeId | null; coefficients: DeviationCoefficients };

export interface CalculatorResult {
	w: number;
	wr: number;
	deltaW: number;
	t90Kelvin: number;
	t90Celsius: number;
	/** dT/dW: how much a change of W moves the temperature, K per unit W */
	sensitivityKelvinPerW: number;
	resistanceOhm: number | null;
}

export type CalculatorOutcome = { ok: true; result: CalculatorResult } | { ok: false; message: string };

// Without a sub-range the thermometer is taken as ideal: ΔW = 0, so W = W_r and the reference
// function alone gives the temperature (over its whole range, 13.8033 K to 1234.93 K).
export function calculate(input: CalculatorInput): CalculatorOutcome {
	try {
		let w: number;
		let resistanceOhm: number | null = null;
		if (input.direction === 'r-to-t') {
			if (!(input.rTpwOhm > 0)) return { ok: false, message: 'R_TPW must be a resistance above 0 Ω.' };
			if (!(input.resistanceOhm > 0)) return { ok: false, message: 'R must be a resistance above 0 Ω.' };
			resistanceOhm = input.resistanceOhm;
			w = input.resistanceOhm / input.rTpwOhm;
		} else if (input.direction === 'w-to-t') {
			w = input.w;
		} else {
			const t = input.t90Kelvin;
			w = input.subrange ? ratioFromTemperature(t, input.subrange, input.coefficients) : referenceRatio(t);
		}
		const sr = input.subrange;
		const k = input.coefficients;
		const t90Kelvin =
			input.direction === 't-to-w' ? input.t90Kelvin : sr ? temperatureFromRatio(w, sr, k) : referenceTemperature(w);
		const deltaW = sr ? deviation(sr, k, w) : 0;
		const sensitivityKelvinPerW = sr ? dTdW(w, sr, k) : 1 / referenceRatioDerivative(t90Kelvin);
		return {
			ok: true,
			result: { w, wr: w - deltaW, deltaW, t90Kelvin, t90Celsius: t90Kelvin - 273.15, sensitivityKelvinPerW, resistanceOhm }
		};
	} catch (e) {
		if (e instanceof MetrologyError) return { ok: false, message: e.message };
		throw e;
	}
}
