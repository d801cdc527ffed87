// Pressure and hydrostatic-head corrections (ITS-90 Table 2 and its notes): what a perfect sensor
// reads in a real cell, as opposed to the assigned value at 101 325 Pa and at the liquid surface.

import { MetrologyError, requireFinite, requireNonNegative, requirePositive } from './errors';
import { fixedPoint, STANDARD_PRESSURE_PA } from './fixed-points';
import type { FixedPointId } from './types';

/** (dT/dl)·h in kelvin, h = depth of the sensor's mid-point below the free surface, metres. */
export function hydrostaticCorrectionKelvin(point: FixedPointId, depthMetre: number): number {
	const where = 'hydrostaticCorrectionKelvin';
	const fp = fixedPoint(point);
	requireNonNegative(depthMetre, 'depth below the free surface (m)', where);
	if (depthMetre > 2) {
		// No cell is 2 m deep: this is almost certainly millimetres or centimetres passed as metres.
		throw new MetrologyError('out_of_range', `${where}: depth ${depthMetre} m is implausible for a fixed-point cell (max 2 m); depth is in metres`, { where, depthMetre });
	}
	return fp.dTdl * depthMetre;
}

/**
 * (dT/dp)·(p − 101 325 Pa) in kelvin for melting and freezing points. Triple points are realised at
 * their own vapour pressure, so the gas pressure over them changes nothing: 0 (ITS-90 Table 2 note).
 */
export function pressureCorrectionKelvin(point: FixedPointId, pressurePa: number): number {
	const where = 'pressureCorrectionKelvin';
	const fp = fixedPoint(point);
	requirePositive(pressurePa, 'pressure (Pa)', where);
	if (pressurePa > 1e6) {
		throw new MetrologyError('out_of_range', `${where}: pressure ${pressurePa} Pa is implausible for a fixed-point cell (max 1 MPa); pressure is in pascal`, { where, pressurePa });
	}
	if (fp.state === 'triple') return 0;
	return fp.dTdp * (pressurePa - STANDARD_PRESSURE_PA);
}

export interface CellConditions {
	/** sensor mid-point below the free surface, m (default 0) */
	depthMetre?: number;
	/** gas pressure over the melt, Pa (default 101 325 Pa) */
	pressurePa?: number;
}

/** T90 plus both corrections, kelvin: what a perfect sensor reads in the cell. */
export function expectedSensorKelvin(point: FixedPointId, conditions: CellConditions = {}): number {
	const fp = fixedPoint(point);
	const depth = conditions.depthMetre ?? 0;
	const pressure = conditions.pressurePa ?? STANDARD_PRESSURE_PA;
	requireFinite(depth, 'depthMetre', 'expectedSensorKelvin');
	return fp.t90 + hydrostaticCorrectionKelvin(point, depth) + pressureCorrectionKelvin(point, pressure);
}
