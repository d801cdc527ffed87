import { describe, expect, it } from 'vitest';
import { ratioSensitivityKelvin, resistanceFromBridgeRatio, standardResistorOhm } from './bridge';
import { ratioFromTemperature } from './deviation';
import { reduceReading, rTpwNearestInTime } from './reduction';
import { thrownCode } from './test-helpers';

// A 25 Ω standard resistor certified at 23 °C with α = 2e-6 /K, β = −5e-7 /K² (illustrative values).
const resistor = { calibratedOhm: 25, referenceTemperatureCelsius: 23, alphaPerKelvin: 2e-6, betaPerKelvin2: -5e-7 };

describe('bridge reduction R = ratio × R_s(t) (common practice, resistor certificate form)', () => {
	it('applies α and β: at 23.5 °C R_s = 25 × (1 + 2e-6 × 0.5 − 5e-7 × 0.25) = 25.000021875 Ω', () => {
		expect(standardResistorOhm(resistor, 23.5)).toBeCloseTo(25.000021875, 12);
		// ratio 1.2 → 1.2 × 25.000021875 = 30.00002625 Ω
		expect(resistanceFromBridgeRatio(1.2, resistor, 23.5)).toBeCloseTo(30.00002625, 11);
	});
	it('without a resistor temperature uses the certified value', () => {
		expect(resistanceFromBridgeRatio(1.2, resistor)).toBe(30);
		expect(resistanceFromBridgeRatio(1.2, resistor, 23)).toBe(30);
	});
	it('β acts symmetrically about t0, α does not', () => {
		const betaOnly = { ...resistor, alphaPerKelvin: 0 };
		expect(standardResistorOhm(betaOnly, 22)).toBeCloseTo(standardResistorOhm(betaOnly, 24), 14);
		expect(standardResistorOhm(resistor, 24)).toBeGreaterThan(standardResistorOhm(resistor, 22));
	});
});

describe('ratio sensitivity', () => {
	it('at the TPW (W = 1, a = 0): dT/dW × R_s/R_TPW = 250.719 K × 25/25.5 = 245.803 K per unit ratio (its90-data.md dW_r/dT)', () => {
		const ratio = 25.5 / 25;
		expect(ratioSensitivityKelvin(ratio, resistor, 25.5, 'TPW-Ga', { a: 0 })).toBeCloseTo(245.803, 2);
		// so 1e-8 of ratio noise is 2.458 µK
		expect(ratioSensitivityKelvin(ratio, resistor, 25.5, 'TPW-Ga', { a: 0 }) * 1e-8 * 1e6).toBeCloseTo(2.458, 2);
	});
	it('matches a finite difference of the full reduction', () => {
		const input = { resistor, rTpwOhm: 25.319871, subrange: 'TPW-Sn-Zn' as const, coefficients: { a: -1.2134e-4, b: -9.919e-6 }, point: 'Zn' as const };
		const ratio = 65.039218 / 25;
		const h = 1e-7;
		const numeric = (reduceReading({ ...input, ratio: ratio + h }).t90Kelvin - reduceReading({ ...input, ratio: ratio - h }).t90Kelvin) / (2 * h);
		expect(ratioSensitivityKelvin(ratio, resistor, 25.319871, 'TPW-Sn-Zn', input.coefficients) / numeric).toBeCloseTo(1, 6);
	});
});

describe('reduceReading', () => {
	const base = { resistor, rTpwOhm: 25.319871, subrange: 'TPW-Sn-Zn' as const, coefficients: { a: -1.2134e-4, b: -9.919e-6 } };

	it('NIST SP 250-81 Sn example through the bridge: within 0.1 mK of the assigned value', () => {
		const r = reduceReading({ ...base, ratio: 47.922451 / 25, point: 'Sn' });
		expect(r.resistanceOhm).toBeCloseTo(47.922451, 9);
		expect(r.w).toBeCloseTo(47.922451 / 25.319871, 12);
		expect(Math.abs(r.deltaMilliKelvin)).toBeLessThan(0.1);
	});

	it('delta is measured against T90 + corrections (ITS-90 Table 2): Zn, 0.18 m deep, 101 325 Pa', () => {
		// expected sensor: 692.677 K + 2.7e-3 K/m × 0.18 m = 692.677486 K; a sensor reading 0.5 mK above it
		const expected = 692.677 + 2.7e-3 * 0.18;
		const w = ratioFromTemperature(expected + 0.5e-3, base.subrange, base.coefficients);
		const r = reduceReading({ ...base, ratio: (w * base.rTpwOhm) / 25, point: 'Zn', corrections: { depthMetre: 0.18 } });
		expect(r.expectedSensorKelvin).toBeCloseTo(692.677486, 9);
		expect(r.deltaMilliKelvin).toBeCloseTo(0.5, 5);
		expect(r.hydrostaticCorrectionKelvin).toBeCloseTo(0.486e-3, 12);
		expect(r.pressureCorrectionKelvin).toBe(0);
	});
});

describe('rTpwNearestInTime', () => {
	const history = [
		{ timeMs: 1000, rTpwOhm: 25.5 },
		{ timeMs: 5000, rTpwOhm: 25.50001 },
		{ timeMs: 9000, rTpwOhm: 25.50002 }
	];
	it('picks the nearest measurement, before or after', () => {
		expect(rTpwNearestInTime(history, 5600)).toBe(25.50001);
		expect(rTpwNearestInTime(history, 8000)).toBe(25.50002);
		expect(rTpwNearestInTime(history, -50)).toBe(25.5);
	});
	it('on a tie prefers the earlier check (common practice)', () => {
		expect(rTpwNearestInTime(history, 3000)).toBe(25.5);
		expect(rTpwNearestInTime([...history].reverse(), 3000)).toBe(25.5);
	});
	it('an empty history is a missing TPW point', () => {
		expect(thrownCode(() => rTpwNearestInTime([], 0))).toBe('missing_point');
	});
});
