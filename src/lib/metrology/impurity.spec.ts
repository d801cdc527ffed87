import { describe, expect, it } from 'vitest';
import { FIXED_POINT_IDS, fixedPoint } from './fixed-points';
import {
	impurityFromDepressionKelvin,
	impurityFromInverseFractionSlope,
	milliKelvinPerMicroMolPerMol,
	omeDepressionKelvin,
	purityToImpurityMolFraction,
	raoultDepressionKelvin
} from './impurity';
import { thrownCode } from './test-helpers';

describe('enthalpies of fusion and cryoscopic constants', () => {
	it('indium: CRC 3.291 kJ/mol agrees with adiabatic calorimetry 28.6624 J/g (J. Chem. Eng. Data 48, 1157 (2003)) × 114.818 g/mol (IUPAC standard atomic weight of In) = 3.2910 kJ/mol', () => {
		const calorimetryJPerMol = 28.6624 * 114.818; // = 3290.96 J/mol
		expect(Math.abs(fixedPoint('In').enthalpyOfFusionJPerMol - calorimetryJPerMol)).toBeLessThan(0.5);
	});
	it('CRC 95th ed. "Heat of fusion" values, kJ/mol (its90-data.md)', () => {
		const crc = { Hg: 2.295, TPW: 6.01, Ga: 5.585, In: 3.291, Sn: 7.15, Zn: 7.068, Al: 10.71, Ag: 11.3 } as const;
		for (const [id, kJ] of Object.entries(crc) as [keyof typeof crc, number][]) {
			expect(fixedPoint(id).enthalpyOfFusionJPerMol).toBeCloseTo(kJ * 1000, 6);
		}
	});
	it('argon (memory): 1.18 kJ/mol, marked as such in the data', () => {
		expect(fixedPoint('Ar').enthalpyOfFusionJPerMol).toBeCloseTo(1180, 6);
		expect(fixedPoint('Ar').enthalpySource).toMatch(/memory/);
	});
	it('A = L/(R T²) by hand from CRC values: Sn 7150/(8.314462618 × 505.078²) = 3.37097e-3 /K, Zn 7068/(8.314462618 × 692.677²) = 1.77174e-3 /K', () => {
		expect(fixedPoint('Sn').cryoscopicConstantPerKelvin).toBeCloseTo(3.37097e-3, 8);
		expect(fixedPoint('Zn').cryoscopicConstantPerKelvin).toBeCloseTo(1.77174e-3, 8);
	});
	it('A is positive and finite at every point', () => {
		for (const id of FIXED_POINT_IDS) {
			const a = fixedPoint(id).cryoscopicConstantPerKelvin;
			expect(Number.isFinite(a) && a > 0).toBe(true);
		}
	});
});

describe('purity and OME (common practice, no single source)', () => {
	it('"six nines" = 99.9999 % = 1 µmol/mol impurity', () => {
		expect(purityToImpurityMolFraction(99.9999)).toBeCloseTo(1e-6, 15);
		expect(purityToImpurityMolFraction(99.999)).toBeCloseTo(1e-5, 14);
		expect(purityToImpurityMolFraction(100)).toBe(0);
	});
	it('OME per µmol/mol = 1e-6/A: Sn 0.29665 mK, Zn 0.56442 mK (A by hand above)', () => {
		// 1e-6 / 3.37097e-3 = 2.9665e-4 K; 1e-6 / 1.77174e-3 = 5.6442e-4 K
		expect(milliKelvinPerMicroMolPerMol('Sn')).toBeCloseTo(0.29665, 4);
		expect(milliKelvinPerMicroMolPerMol('Zn')).toBeCloseTo(0.56442, 4);
		expect(omeDepressionKelvin('Sn', purityToImpurityMolFraction(99.9999))).toBeCloseTo(0.29665e-3, 7);
	});
	it('heavier, hotter points are more sensitive per µmol/mol: Ag > Al > Zn > Sn (A falls with T²)', () => {
		expect(milliKelvinPerMicroMolPerMol('Ag')).toBeGreaterThan(milliKelvinPerMicroMolPerMol('Al'));
		expect(milliKelvinPerMicroMolPerMol('Al')).toBeGreaterThan(milliKelvinPerMicroMolPerMol('Zn'));
		expect(milliKelvinPerMicroMolPerMol('Zn')).toBeGreaterThan(milliKelvinPerMicroMolPerMol('Sn'));
	});
});

describe('Raoult (its90-data.md "Other relations")', () => {
	it('ΔT = (c/A)/F: at F = 1 equals the OME, at F = 0.5 twice it', () => {
		expect(raoultDepressionKelvin('Zn', 1e-6, 1)).toBeCloseTo(omeDepressionKelvin('Zn', 1e-6), 15);
		expect(raoultDepressionKelvin('Zn', 1e-6, 0.5)).toBeCloseTo(2 * omeDepressionKelvin('Zn', 1e-6), 15);
	});
	it('inverse: c = A ΔT, and the 1/F slope −c/A gives c back', () => {
		expect(impurityFromDepressionKelvin('Sn', omeDepressionKelvin('Sn', 3e-7))).toBeCloseTo(3e-7, 18);
		// T(F) = T0 − (c/A)/F: slope against 1/F is −c/A
		const c = 2e-6;
		const slope = -c / fixedPoint('Al').cryoscopicConstantPerKelvin;
		expect(impurityFromInverseFractionSlope('Al', slope)).toBeCloseTo(c, 15);
	});
	it('rejects F outside (0, 1], negative impurity, a positive 1/F slope', () => {
		expect(thrownCode(() => raoultDepressionKelvin('Sn', 1e-6, 0))).toBe('out_of_range');
		expect(thrownCode(() => raoultDepressionKelvin('Sn', 1e-6, 1.2))).toBe('out_of_range');
		expect(thrownCode(() => omeDepressionKelvin('Sn', -1e-6))).toBe('invalid_input');
		expect(thrownCode(() => omeDepressionKelvin('Sn', 1))).toBe('out_of_range');
		expect(thrownCode(() => impurityFromInverseFractionSlope('Sn', 1e-4))).toBe('invalid_input');
		expect(thrownCode(() => purityToImpurityMolFraction(100.1))).toBe('out_of_range');
	});
});
