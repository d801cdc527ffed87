// One reading from bridge ratio to millikelvin from the assigned value (the flow in design.md).

import { MetrologyError, requireFinite, requirePositive } from './errors';
import { resistanceFromBridgeRatio } from './bridge';
import { expectedSensorKelvin, hydrostaticCorrectionKelvin, pressureCorrectionKelvin } from './corrections';
import { temperatureFromRatio } from './deviation';
import { STANDARD_PRESSURE_PA } from './fixed-points';
import type { DeviationCoefficients, FixedPointId, StandardResistor, SubrangeId } from './types';

export interface ReadingInput {
	ratio: number;
	resistor: StandardResistor;
	resistorTemperatureCelsius?: number;
	rTpwOhm: number;
	subrange: SubrangeId;
	coefficients: DeviationCoefficients;
	point: FixedPointId;
	corrections?: { depthMetre?: number; pressurePa?: number };
}

export interface ReducedReading {
	resistanceOhm: number;
	w: number;
	t90Kelvin: number;
	/** (T90 measured − expected sensor temperature) × 1000: from the assigned value, after corrections */
	deltaMilliKelvin: number;
	expectedSensorKelvin: number;
	hydrostaticCorrectionKelvin: number;
	pressureCorrectionKelvin: number;
}

export function reduceReading(input: ReadingInput): ReducedReading {
	const where = 'reduceReading';
	if (input === null || typeof input !== 'object') throw new MetrologyError('invalid_input', `${where}: input must be an object`, { where });
	requirePositive(input.rTpwOhm, 'R_TPW (ohm)', where);
	const resistanceOhm = resistanceFromBridgeRatio(input.ratio, input.resistor, input.resistorTemperatureCelsius);
	const w = resistanceOhm / input.rTpwOhm;
	const t90Kelvin = temperatureFromRatio(w, input.subrange, input.coefficients);
	const depthMetre = input.corrections?.depthMetre ?? 0;
	const pressurePa = input.corrections?.pressurePa ?? STANDARD_PRESSURE_PA;
	const expected = expectedSensorKelvin(input.point, { depthMetre, pressurePa });
	return {
		resistanceOhm,
		w,
		t90Kelvin,
		deltaMilliKelvin: (t90Kelvin - expected) * 1000,
		expectedSensorKelvin: expected,
		hydrostaticCorrectionKelvin: hydrostaticCorrectionKelvin(input.point, depthMetre),
		pressureCorrectionKelvin: pressureCorrectionKelvin(input.point, pressurePa)
	};
}

/**
 * The R_TPW measured nearest in time to timeMs (UTC ms). On a tie the earlier one wins: a reading is
 * normally referred to the TPW check made before it (common practice).
 */
export function rTpwNearestInTime(history: { timeMs: number; rTpwOhm: number }[], timeMs: number): number {
	const where = 'rTpwNearestInTime';
	requireFinite(timeMs, 'timeMs', where);
	if (!Array.isArray(history) || history.length === 0) {
		throw new MetrologyError('missing_point', `${where}: no R_TPW measurement in the history`, { where });
	}
	let best = history[0];
	for (const h of history) {
		requireFinite(h.timeMs, 'history timeMs', where);
		requirePositive(h.rTpwOhm, 'history rTpwOhm', where);
		const d = Math.abs(h.timeMs - timeMs);
		const bestD = Math.abs(best.timeMs - timeMs);
		if (d < bestD || (d === bestD && h.timeMs < best.timeMs)) best = h;
	}
	return best.rTpwOhm;
}
