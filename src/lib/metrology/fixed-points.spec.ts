import { describe, expect, it } from 'vitest';
import { FIXED_POINT_IDS, fixedPoint } from './fixed-points';
import { referenceRatio } from './reference-function';

describe('fixed-point data (ITS-90 Tables 1 and 2)', () => {
	it('t90/°C = T90/K − 273.15 for every point (ITS-90 Eq. (2))', () => {
		for (const id of FIXED_POINT_IDS) {
			const fp = fixedPoint(id);
			expect(fp.t90Celsius).toBeCloseTo(fp.t90 - 273.15, 9);
		}
	});
	it('TPW is 273.16 K by definition (common practice, no single source)', () => {
		expect(fixedPoint('TPW').t90).toBe(273.16);
		expect(fixedPoint('TPW').wr).toBe(1);
	});
	it('stored Table 1 W_r agrees with the reference function to 1e-8 (independent route)', () => {
		for (const id of FIXED_POINT_IDS) expect(Math.abs(referenceRatio(fixedPoint(id).t90) - fixedPoint(id).wr)).toBeLessThanOrEqual(1e-8 + 1e-15);
	});
	it('Table 2 units: dT/dp in K/Pa and dT/dl in K/m (e.g. Zn 4.3e-8 K/Pa, 2.7e-3 K/m; water −7.5e-8, −0.73e-3)', () => {
		expect(fixedPoint('Zn').dTdp).toBeCloseTo(4.3e-8, 15);
		expect(fixedPoint('Zn').dTdl).toBeCloseTo(2.7e-3, 12);
		expect(fixedPoint('TPW').dTdp).toBeCloseTo(-7.5e-8, 15);
		expect(fixedPoint('TPW').dTdl).toBeCloseTo(-0.73e-3, 12);
	});
	it('states: Ar, Hg, TPW triple; Ga melting; In to Ag freezing (ITS-90 Table 1)', () => {
		expect(['Ar', 'Hg', 'TPW'].map((id) => fixedPoint(id as never).state)).toEqual(['triple', 'triple', 'triple']);
		expect(fixedPoint('Ga').state).toBe('melting');
		for (const id of ['In', 'Sn', 'Zn', 'Al', 'Ag'] as const) expect(fixedPoint(id).state).toBe('freezing');
		expect(fixedPoint('Hg').name).toBe('Triple point of mercury');
	});
	it('data objects are frozen so a caller cannot change the scale', () => {
		expect(Object.isFrozen(fixedPoint('Sn'))).toBe(true);
		expect(Object.isFrozen(FIXED_POINT_IDS)).toBe(true);
	});
});
