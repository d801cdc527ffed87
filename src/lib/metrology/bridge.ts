// Resistance-ratio bridge reduction: R = ratio × R_s(t), with the standard resistor's temperature
// coefficients R_s(t) = R_s,cal (1 + α(t − t0) + β(t − t0)²) (common practice for resistor certificates).

import { MetrologyError, requireFinite, requirePositive } from './errors';
import { dTdW } from './deviation';
import type { DeviationCoefficients, StandardResistor, SubrangeId } from './types';

function checkResistor(resistor: StandardResistor, where: string): void {
	if (resistor === null || typeof resistor !== 'object') {
		throw new MetrologyError('invalid_input', `${where}: standard resistor must be an object`, { where });
	}
	requirePositive(resistor.calibratedOhm, 'resistor.calibratedOhm', where);
	requireFinite(resistor.referenceTemperatureCelsius, 'resistor.referenceTemperatureCelsius', where);
	requireFinite(resistor.alphaPerKelvin, 'resistor.alphaPerKelvin', where);
	requireFinite(resistor.betaPerKelvin2, 'resistor.betaPerKelvin2', where);
}

/** The standard resistor's value at its temperature (default: its reference temperature), ohm. */
export function standardResistorOhm(resistor: StandardResistor, resistorTemperatureCelsius?: number): number {
	const where = 'standardResistorOhm';
	checkResistor(resistor, where);
	if (resistorTemperatureCelsius === undefined) return resistor.calibratedOhm;
	requireFinite(resistorTemperatureCelsius, 'resistor temperature (°C)', where);
	const dt = resistorTemperatureCelsius - resistor.referenceTemperatureCelsius;
	const value = resistor.calibratedOhm * (1 + resistor.alphaPerKelvin * dt + resistor.betaPerKelvin2 * dt * dt);
	if (!(value > 0)) {
		throw new MetrologyError('out_of_range', `${where}: resistor value is not positive at ${resistorTemperatureCelsius} °C; check α, β`, { where, value });
	}
	return value;
}

/** Thermometer resistance in ohm from the bridge ratio R_x/R_s. */
export function resistanceFromBridgeRatio(ratio: number, resistor: StandardResistor, resistorTemperatureCelsius?: number): number {
	requirePositive(ratio, 'bridge ratio', 'resistanceFromBridgeRatio');
	return ratio * standardResistorOhm(resistor, resistorTemperatureCelsius);
}

/** dT/d(ratio) in kelvin per unit ratio = dT/dW × R_s/R_TPW, so ratio noise converts to temperature. */
export function ratioSensitivityKelvin(
	ratio: number,
	resistor: StandardResistor,
	rTpwOhm: number,
	subrangeId: SubrangeId,
	k: DeviationCoefficients,
	resistorTemperatureCelsius?: number
): number {
	requirePositive(rTpwOhm, 'R_TPW (ohm)', 'ratioSensitivityKelvin');
	const rsOhm = standardResistorOhm(resistor, resistorTemperatureCelsius);
	requirePositive(ratio, 'bridge ratio', 'ratioSensitivityKelvin');
	return dTdW((ratio * rsOhm) / rTpwOhm, subrangeId, k) * (rsOhm / rTpwOhm);
}
