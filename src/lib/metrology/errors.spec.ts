import { describe, expect, it } from 'vitest';
import * as m from './index';
import { thrownCode } from './test-helpers';

const sn = { a: -1.2134e-4, b: -9.919e-6 };
const resistor = { calibratedOhm: 25, referenceTemperatureCelsius: 23, alphaPerKelvin: 0, betaPerKelvin2: 0 };

describe('bad input throws MetrologyError with the right code', () => {
	it('out_of_range: temperatures and W_r outside the reference functions (beyond the documented margins)', () => {
		expect(thrownCode(() => m.referenceRatio(5))).toBe('out_of_range');
		expect(thrownCode(() => m.referenceRatio(1300))).toBe('out_of_range');
		expect(thrownCode(() => m.referenceTemperature(5))).toBe('out_of_range');
		expect(thrownCode(() => m.referenceTemperature(1e-4))).toBe('out_of_range');
		// inside the margins: fine
		expect(thrownCode(() => m.referenceRatio(1234.93 + 4))).toBe('no error thrown');
	});
	it('out_of_range: readings beyond a sub-range plus its 5 K margin', () => {
		expect(thrownCode(() => m.temperatureFromRatio(m.referenceRatio(800), 'TPW-Sn-Zn', sn))).toBe('out_of_range');
		expect(thrownCode(() => m.ratioFromTemperature(200, 'TPW-In', { a: 0 }))).toBe('out_of_range');
		expect(thrownCode(() => m.temperatureFromRatio(0.1, 'Ar-Hg-TPW', { a: 0, b: 0 }))).toBe('out_of_range');
		expect(thrownCode(() => m.temperatureFromRatio(m.referenceRatio(692.677 + 4.9), 'TPW-Sn-Zn', { a: 0, b: 0 }))).toBe('no error thrown');
	});
	it('invalid_input: W ≤ 0, NaN, Infinity', () => {
		expect(thrownCode(() => m.temperatureFromRatio(0, 'TPW-Sn-Zn', sn))).toBe('invalid_input');
		expect(thrownCode(() => m.temperatureFromRatio(-1, 'TPW-Sn-Zn', sn))).toBe('invalid_input');
		expect(thrownCode(() => m.temperatureFromRatio(Number.NaN, 'TPW-Sn-Zn', sn))).toBe('invalid_input');
		expect(thrownCode(() => m.deviation('TPW-Sn-Zn', sn, Infinity))).toBe('invalid_input');
		expect(thrownCode(() => m.referenceRatio(Number.NaN))).toBe('invalid_input');
		expect(thrownCode(() => m.referenceTemperature(0))).toBe('invalid_input');
		expect(thrownCode(() => m.resistanceFromBridgeRatio(Number.NaN, resistor))).toBe('invalid_input');
		expect(thrownCode(() => m.resistanceFromBridgeRatio(1, { ...resistor, calibratedOhm: 0 }))).toBe('invalid_input');
		expect(thrownCode(() => m.reduceReading({ ratio: 1.9, resistor, rTpwOhm: 0, subrange: 'TPW-Sn-Zn', coefficients: sn, point: 'Sn' }))).toBe('invalid_input');
	});
	it('invalid_input: coefficients the sub-range needs are missing or not finite', () => {
		expect(thrownCode(() => m.deviation('TPW-Sn-Zn', { a: 1e-4 }, 2))).toBe('invalid_input');
		expect(thrownCode(() => m.deviation('TPW-Sn-Zn-Al-Ag', { a: 1e-4, b: 0, c: 0, d: 0 }, 2))).toBe('invalid_input');
		expect(thrownCode(() => m.deviation('TPW-In', { a: Number.NaN }, 1.5))).toBe('invalid_input');
	});
	it('missing_point: a sub-range fitted without one of its calibration points', () => {
		expect(thrownCode(() => m.fitDeviation('TPW-Sn-Zn', [{ point: 'Sn', w: 1.8926 }]))).toBe('missing_point');
		expect(thrownCode(() => m.fitDeviation('TPW-Sn-Zn-Al-Ag', [{ point: 'Sn', w: 1.8926 }, { point: 'Zn', w: 2.568 }, { point: 'Al', w: 3.375 }]))).toBe('missing_point');
		expect(thrownCode(() => m.fitDeviation('Ar-Hg-TPW', []))).toBe('missing_point');
	});
	it('invalid_input: a point that does not belong to the sub-range, a duplicate, W(TPW) ≠ 1', () => {
		expect(thrownCode(() => m.fitDeviation('TPW-In', [{ point: 'In', w: 1.6095 }, { point: 'Sn', w: 1.8926 }]))).toBe('invalid_input');
		expect(thrownCode(() => m.fitDeviation('TPW-In', [{ point: 'In', w: 1.6095 }, { point: 'In', w: 1.6096 }]))).toBe('invalid_input');
		expect(thrownCode(() => m.fitDeviation('TPW-In', [{ point: 'In', w: 1.6095 }, { point: 'TPW', w: 1.0001 }]))).toBe('invalid_input');
	});
	it('unknown_id: fixed point, sub-range, distribution', () => {
		expect(thrownCode(() => m.fixedPoint('Cu' as never))).toBe('unknown_id');
		expect(thrownCode(() => m.subrange('TPW-Cu' as never))).toBe('unknown_id');
		expect(thrownCode(() => m.temperatureFromRatio(1.5, 'nope' as never, { a: 0 }))).toBe('unknown_id');
		expect(thrownCode(() => m.fitDeviation('TPW-In', [{ point: 'Xx' as never, w: 1.6 }]))).toBe('unknown_id');
		expect(thrownCode(() => m.hydrostaticCorrectionKelvin('H2' as never, 0.1))).toBe('unknown_id');
	});
	it('singular_system: a linear system with no unique solution', () => {
		expect(thrownCode(() => m.solveLinearSystem([[1, 2], [2, 4]], [1, 2]))).toBe('singular_system');
	});
	it('errors carry a message naming the function and details', () => {
		try {
			m.referenceRatio(2000);
			expect.unreachable();
		} catch (e) {
			expect(e).toBeInstanceOf(m.MetrologyError);
			const err = e as m.MetrologyError;
			expect(err.message).toMatch(/referenceRatio/);
			expect(err.message).toMatch(/2000/);
			expect(err.details.t90Kelvin).toBe(2000);
			expect(err.name).toBe('MetrologyError');
		}
	});
});
