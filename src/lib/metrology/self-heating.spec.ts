import { describe, expect, it } from 'vitest';
import { selfHeatingKelvin, zeroCurrentFit, zeroCurrentResistance } from './self-heating';
import { thrownCode } from './test-helpers';

// R = R0 + s I², R0 = 25 Ω, s = 1e-5 Ω/mA² (values picked so the arithmetic is exact by hand).
const r = (iMilliAmp: number) => 25 + 1e-5 * iMilliAmp * iMilliAmp;

describe('zero-current extrapolation (R ∝ I², its90-data.md "Other relations")', () => {
	it('I and √2 I: R(0) = 2R(I) − R(√2 I) = 2 × 25.00001 − 25.00002 = 25', () => {
		expect(zeroCurrentResistance(25.00001, 1, 25.00002, Math.SQRT2)).toBeCloseTo(25, 12);
		expect(zeroCurrentResistance(25.00001, 1, 25.00002, Math.SQRT2)).toBeCloseTo(2 * 25.00001 - 25.00002, 12);
	});
	it('any two currents: 1 mA and 2 mA, (25.00001 × 4 − 25.00004 × 1)/3 = 25', () => {
		expect(zeroCurrentResistance(r(1), 1, r(2), 2)).toBeCloseTo(25, 12);
		expect(zeroCurrentResistance(r(2), 2, r(1), 1)).toBeCloseTo(25, 12);
	});
	it('equal currents cannot be extrapolated', () => {
		expect(thrownCode(() => zeroCurrentResistance(25, 1, 25.1, 1))).toBe('invalid_input');
		expect(thrownCode(() => zeroCurrentResistance(25, 1, 25.1, -1))).toBe('invalid_input');
	});
});

describe('least-squares fit of R against I²', () => {
	it('exact data: intercept 25 Ω, slope 1e-5 Ω/mA², standard error ~0', () => {
		const fit = zeroCurrentFit([0.5, 1, 1.414, 2].map((i) => ({ currentMilliAmp: i, resistanceOhm: r(i) })));
		expect(fit.zeroCurrentOhm).toBeCloseTo(25, 11);
		expect(fit.slopeOhmPerMilliAmp2).toBeCloseTo(1e-5, 12);
		expect(fit.stdErrZeroOhm).toBeLessThan(1e-11);
		expect(fit.degreesOfFreedom).toBe(2);
	});
	it('hand-computed example: I = 1, 2, 3 mA, R = 10.1, 10.5, 10.8 Ω', () => {
		// x = I² = 1, 4, 9; x̄ = 14/3; ȳ = 31.4/3; Sxx = 98/3; Sxy = 2.766667
		// slope = Sxy/Sxx = 0.0846939; intercept = ȳ − slope x̄ = 10.0714286
		// residuals −0.0561224, 0.0897959, −0.0336735; SS = 0.0123469; s = √(SS/1) = 0.111117
		// se(intercept) = s √(1/3 + x̄²/Sxx) = s √(1/3 + 2/3) = 0.111117
		const fit = zeroCurrentFit([
			{ currentMilliAmp: 1, resistanceOhm: 10.1 },
			{ currentMilliAmp: 2, resistanceOhm: 10.5 },
			{ currentMilliAmp: 3, resistanceOhm: 10.8 }
		]);
		expect(fit.slopeOhmPerMilliAmp2).toBeCloseTo(0.0846939, 6);
		expect(fit.zeroCurrentOhm).toBeCloseTo(10.0714286, 6);
		expect(fit.stdErrZeroOhm).toBeCloseTo(0.111117, 5);
	});
	it('two currents: same intercept as the two-current formula, no standard error', () => {
		const fit = zeroCurrentFit([
			{ currentMilliAmp: 1, resistanceOhm: 25.0000113 },
			{ currentMilliAmp: 1.414, resistanceOhm: 25.0000221 }
		]);
		expect(fit.zeroCurrentOhm).toBeCloseTo(zeroCurrentResistance(25.0000113, 1, 25.0000221, 1.414), 12);
		expect(Number.isNaN(fit.stdErrZeroOhm)).toBe(true);
	});
	it('one current only is rejected', () => {
		expect(thrownCode(() => zeroCurrentFit([{ currentMilliAmp: 1, resistanceOhm: 25 }]))).toBe('invalid_input');
		expect(thrownCode(() => zeroCurrentFit([{ currentMilliAmp: 1, resistanceOhm: 25 }, { currentMilliAmp: -1, resistanceOhm: 25 }]))).toBe('invalid_input');
	});
});

describe('self-heating as temperature', () => {
	it('1e-5 Ω at the TPW on 25 Ω: 1e-5/25 / 3.98853e-3 K = 0.10029 mK (its90-data.md dW_r/dT)', () => {
		expect(selfHeatingKelvin(25.00001, 25, 25, 'TPW-Ga', { a: 0 }) * 1e3).toBeCloseTo(0.10029, 4);
	});
});
