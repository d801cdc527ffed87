import { describe, expect, it } from 'vitest';
import { expectedSensorKelvin, hydrostaticCorrectionKelvin, pressureCorrectionKelvin } from './corrections';
import { thrownCode } from './test-helpers';

describe('hydrostatic-head correction (ITS-90 Table 2, dT/dl)', () => {
	it('water: dT/dl = −0.73 mK/m is negative, so a sensor 0.2 m down sees −0.146 mK', () => {
		expect(hydrostaticCorrectionKelvin('TPW', 0.2)).toBeCloseTo(-0.146e-3, 12);
	});
	it('gallium is negative too (−1.2 mK/m), the metals positive (Sn 2.2 mK/m × 0.15 m = 0.33 mK)', () => {
		expect(hydrostaticCorrectionKelvin('Ga', 0.1)).toBeCloseTo(-0.12e-3, 12);
		expect(hydrostaticCorrectionKelvin('Sn', 0.15)).toBeCloseTo(0.33e-3, 12);
		for (const p of ['Ar', 'Hg', 'In', 'Zn', 'Al', 'Ag'] as const) expect(hydrostaticCorrectionKelvin(p, 0.1)).toBeGreaterThan(0);
	});
	it('zero at the surface; depth must be metres ≥ 0', () => {
		expect(hydrostaticCorrectionKelvin('Zn', 0)).toBe(0);
		expect(thrownCode(() => hydrostaticCorrectionKelvin('Zn', -0.1))).toBe('invalid_input');
		expect(thrownCode(() => hydrostaticCorrectionKelvin('Zn', 180))).toBe('out_of_range');
	});
});

describe('pressure correction (ITS-90 Table 2, dT/dp)', () => {
	it('Zn at 1000 Pa above standard: +4.3e-8 K/Pa × 1000 Pa = +43 µK', () => {
		expect(pressureCorrectionKelvin('Zn', 101325 + 1000)).toBeCloseTo(43e-6, 12);
	});
	it('Ga melts lower at higher pressure (dT/dp = −2.0e-8 K/Pa): below standard pressure the correction is positive', () => {
		expect(pressureCorrectionKelvin('Ga', 101325 - 5000)).toBeCloseTo(1e-4, 12);
	});
	it('triple points (Ar, Hg, TPW) get no pressure correction', () => {
		for (const p of ['Ar', 'Hg', 'TPW'] as const) expect(pressureCorrectionKelvin(p, 90000)).toBe(0);
	});
	it('zero at 101 325 Pa', () => {
		expect(pressureCorrectionKelvin('Ag', 101325)).toBe(0);
	});
	it('McLaren, Can. J. Phys. (1957-58), measured: Zn 4.3, Sn 3.3, In 4.9 mK/atm, against our dT/dp × 101 325 Pa', () => {
		const mcLaren = { Zn: 4.3, Sn: 3.3, In: 4.9 } as const;
		for (const [p, mKPerAtm] of Object.entries(mcLaren) as [keyof typeof mcLaren, number][]) {
			// one extra atmosphere over the melt
			const ours = pressureCorrectionKelvin(p, 2 * 101325) * 1e3;
			expect(Math.abs(ours - mKPerAtm)).toBeLessThan(0.1);
		}
	});
	it('pressure must be positive pascal', () => {
		expect(thrownCode(() => pressureCorrectionKelvin('Zn', 0))).toBe('invalid_input');
		expect(thrownCode(() => pressureCorrectionKelvin('Zn', Number.NaN))).toBe('invalid_input');
	});
});

describe('expected sensor temperature = T90 + both corrections (ITS-90 Table 2 notes)', () => {
	it('Sn, 0.15 m deep, 100 000 Pa: 505.078 + 0.33e-3 + 3.3e-8 × (−1325) K', () => {
		expect(expectedSensorKelvin('Sn', { depthMetre: 0.15, pressurePa: 100000 })).toBeCloseTo(505.078 + 0.33e-3 - 3.3e-8 * 1325, 10);
	});
	it('defaults: surface, standard pressure → T90; TPW is 273.16 K by definition (common practice, no single source)', () => {
		expect(expectedSensorKelvin('TPW')).toBe(273.16);
		expect(expectedSensorKelvin('Al', {})).toBe(933.473);
	});
});
