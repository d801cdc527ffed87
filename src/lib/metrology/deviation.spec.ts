import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	deviation,
	dTdW,
	fitDeviation,
	prepareDeviation,
	ratioFromTemperature,
	subrange,
	SUBRANGE_IDS,
	temperatureFromPreparedRatio,
	temperatureFromRatio,
	withAluminiumRatio
} from './deviation';
import { fixedPoint } from './fixed-points';
import { referenceRatio, referenceTemperature } from './reference-function';
import type { DeviationCoefficients, SubrangeId } from './types';

// Plausible SPRT coefficient sizes per sub-range (a few 1e-4 for a, smaller for the higher terms).
const SAMPLE: Record<SubrangeId, DeviationCoefficients> = {
	'Ar-Hg-TPW': { a: -1.6e-4, b: -2.1e-5 },
	'Hg-TPW-Ga': { a: -2.8e-4, b: -3.2e-4 },
	'TPW-Ga': { a: -2.9e-4 },
	'TPW-In': { a: -2.5e-4 },
	'TPW-In-Sn': { a: -2.6e-4, b: -2.0e-5 },
	'TPW-Sn-Zn': { a: -1.2134e-4, b: -9.919e-6 },
	'TPW-Sn-Zn-Al': { a: -2.98e-4, b: -2.35e-5, c: 5.06e-6 },
	'TPW-Sn-Zn-Al-Ag': withAluminiumRatio({ a: -2.98e-4, b: -2.35e-5, c: 5.06e-6, d: 1.7e-5 })
};

const coeffArb = (id: SubrangeId): fc.Arbitrary<DeviationCoefficients> => {
	const a = fc.double({ min: -5e-4, max: 5e-4, noNaN: true });
	const b = fc.double({ min: -5e-5, max: 5e-5, noNaN: true });
	const c = fc.double({ min: -1e-5, max: 1e-5, noNaN: true });
	const d = fc.double({ min: -5e-5, max: 5e-5, noNaN: true });
	const terms = subrange(id).terms;
	if (terms.includes('d')) return fc.record({ a, b, c, d }).map(withAluminiumRatio);
	if (terms.includes('c')) return fc.record({ a, b, c });
	if (terms.includes('b')) return fc.record({ a, b });
	return fc.record({ a });
};

describe('sub-range definitions (ITS-90 Table 5)', () => {
	it('every sub-range lists TPW among its points and its range ends at its last point', () => {
		for (const id of SUBRANGE_IDS) {
			const s = subrange(id);
			expect(s.points).toContain('TPW');
			const top = Math.max(...s.points.map((p) => fixedPoint(p).t90));
			expect(s.maxKelvin).toBe(top);
		}
		expect(SUBRANGE_IDS).toHaveLength(8);
	});
});

describe('NIST SP 250-81 example (TPW–Sn–Zn)', () => {
	// R_TPW = 25.319871 Ω, a = −1.2134e-4, b = −9.9190e-6 (NIST SP 250-81, via its90-data.md).
	const k = { a: -1.2134e-4, b: -9.919e-6 };
	it('R = 47.922451 Ω gives 231.928 °C within 0.1 mK', () => {
		const t = temperatureFromRatio(47.922451 / 25.319871, 'TPW-Sn-Zn', k) - 273.15;
		expect(Math.abs(t - 231.928)).toBeLessThan(1e-4);
	});
	it('R = 65.039218 Ω gives 419.527 °C within 0.1 mK', () => {
		const t = temperatureFromRatio(65.039218 / 25.319871, 'TPW-Sn-Zn', k) - 273.15;
		expect(Math.abs(t - 419.527)).toBeLessThan(1e-4);
	});
});

describe('deviation functions (formula forms: ITS-90 3.3, Table 5)', () => {
	it('Ar–Hg–TPW: a(W−1) + b(W−1) ln W, by hand at W = 0.5', () => {
		// a = 1e-4, b = 2e-5: 1e-4 × (−0.5) + 2e-5 × (−0.5) × ln 0.5 = −5e-5 + 6.931472e-6 = −4.3068528e-5
		expect(deviation('Ar-Hg-TPW', { a: 1e-4, b: 2e-5 }, 0.5)).toBeCloseTo(-4.3068528e-5, 12);
	});
	it('TPW–Sn–Zn–Al: a(W−1) + b(W−1)² + c(W−1)³, by hand at W = 3', () => {
		// 1e-4 × 2 + 1e-5 × 4 + 1e-6 × 8 = 2.48e-4
		expect(deviation('TPW-Sn-Zn-Al', { a: 1e-4, b: 1e-5, c: 1e-6 }, 3)).toBeCloseTo(2.48e-4, 15);
	});
	it('ITS-90 3.3.2: the d-term acts only above the thermometer\'s W(Al)', () => {
		const k = { a: 1e-4, b: 1e-5, c: 1e-6, d: 1e-5, wAl: 3.37 };
		const below = { a: 1e-4, b: 1e-5, c: 1e-6 };
		expect(deviation('TPW-Sn-Zn-Al-Ag', k, 3.0)).toBe(deviation('TPW-Sn-Zn-Al', below, 3.0));
		expect(deviation('TPW-Sn-Zn-Al-Ag', k, 3.37)).toBe(deviation('TPW-Sn-Zn-Al', below, 3.37));
		// at W = 4.37: + 1e-5 × (4.37 − 3.37)² = +1e-5
		expect(deviation('TPW-Sn-Zn-Al-Ag', k, 4.37) - deviation('TPW-Sn-Zn-Al', below, 4.37)).toBeCloseTo(1e-5, 15);
	});
	it('every deviation function vanishes at W = 1 (the TPW)', () => {
		for (const id of SUBRANGE_IDS) expect(Math.abs(deviation(id, SAMPLE[id], 1))).toBe(0);
	});
	it('zero coefficients give the reference function itself', () => {
		expect(temperatureFromRatio(referenceRatio(600), 'TPW-Sn-Zn', { a: 0, b: 0 })).toBeCloseTo(600, 9);
	});
});

describe('fitting (ITS-90 3.3: the function passes through every calibration point)', () => {
	it.each([...SUBRANGE_IDS])('%s: coefficients recovered from W generated at the calibration points', (id) => {
		const k = SAMPLE[id];
		// W at the TPW is 1 by definition (W = R/R_TPW); ratioFromTemperature(273.16 K) is not exactly 1
		// because 10a itself gives W_r(273.16 K) = 1 − 4.7e-9 (ITS-90 Table 1 precision).
		const points = subrange(id).points.map((p) => ({ point: p, w: p === 'TPW' ? 1 : ratioFromTemperature(fixedPoint(p).t90, id, k) }));
		const fitted = fitDeviation(id, points);
		for (const term of subrange(id).terms as (keyof DeviationCoefficients)[]) {
			expect(Math.abs((fitted[term] as number) - (k[term] as number))).toBeLessThan(1e-11);
		}
		if (id === 'TPW-Sn-Zn-Al-Ag') expect(fitted.wAl).toBeCloseTo(k.wAl as number, 13);
	});

	it.each([...SUBRANGE_IDS])('%s: fitted ΔW equals W_i − W_r(T_i) at every point to 1e-12, and T90 comes back (property)', (id) => {
		const pts = subrange(id).points.filter((p) => p !== 'TPW');
		fc.assert(
			fc.property(fc.array(fc.double({ min: -3e-4, max: 3e-4, noNaN: true }), { minLength: pts.length, maxLength: pts.length }), (offsets) => {
				const data = pts.map((p, i) => ({ point: p, w: referenceRatio(fixedPoint(p).t90) + offsets[i] }));
				const k = fitDeviation(id, data);
				for (const { point, w } of data) {
					const t90 = fixedPoint(point).t90;
					expect(Math.abs(deviation(id, k, w) - (w - referenceRatio(t90)))).toBeLessThan(1e-12);
					expect(Math.abs(temperatureFromRatio(w, id, k) - t90)).toBeLessThan(1e-6);
				}
			}),
			{ numRuns: 200 }
		);
	});

	it('TPW given with W = 1 is accepted and changes nothing', () => {
		const data = [
			{ point: 'Sn' as const, w: 1.8926 },
			{ point: 'Zn' as const, w: 2.5684 }
		];
		expect(fitDeviation('TPW-Sn-Zn', [{ point: 'TPW', w: 1 }, ...data])).toEqual(fitDeviation('TPW-Sn-Zn', data));
	});
});

describe('temperature ↔ W', () => {
	it.each([...SUBRANGE_IDS])('%s: temperatureFromRatio(ratioFromTemperature(T)) within 1 µK (property)', (id) => {
		const s = subrange(id);
		fc.assert(
			fc.property(fc.double({ min: s.minKelvin, max: s.maxKelvin, noNaN: true }), coeffArb(id), (t, k) => {
				return Math.abs(temperatureFromRatio(ratioFromTemperature(t, id, k), id, k) - t) < 1e-6;
			}),
			{ numRuns: 300 }
		);
	});

	it.each([...SUBRANGE_IDS])('%s: prepared coefficients give exactly temperatureFromRatio (property)', (id) => {
		const s = subrange(id);
		fc.assert(
			fc.property(fc.double({ min: s.minKelvin, max: s.maxKelvin, noNaN: true }), coeffArb(id), (t, k) => {
				const w = ratioFromTemperature(t, id, k);
				return temperatureFromPreparedRatio(w, prepareDeviation(id, k)) === temperatureFromRatio(w, id, k);
			}),
			{ numRuns: 200 }
		);
	});

	it('prepareDeviation refuses what temperatureFromRatio refuses, and later changes to the object do not reach it', () => {
		expect(() => prepareDeviation('TPW-Sn-Zn', { a: Number.NaN, b: 0 })).toThrow(/coefficient a/);
		expect(() => prepareDeviation('TPW-Sn-Zn-Al-Ag', { a: 0, b: 0, c: 0, d: 0 })).toThrow(/wAl/);
		const k: DeviationCoefficients = { ...SAMPLE['TPW-Sn-Zn'] };
		const p = prepareDeviation('TPW-Sn-Zn', k);
		const before = temperatureFromPreparedRatio(1.9, p);
		k.a = 0;
		expect(temperatureFromPreparedRatio(1.9, p)).toBe(before);
		expect(() => temperatureFromPreparedRatio(-1, p)).toThrow(/W must be > 0/);
	});

	it('ratioFromTemperature satisfies W − ΔW(W) = W_r(T) (definition)', () => {
		const k = SAMPLE['TPW-Sn-Zn-Al-Ag'];
		for (const t of [300, 700, 1000, 1234.93]) {
			const w = ratioFromTemperature(t, 'TPW-Sn-Zn-Al-Ag', k);
			expect(Math.abs(w - deviation('TPW-Sn-Zn-Al-Ag', k, w) - referenceRatio(t))).toBeLessThan(1e-14);
		}
	});

	it('dT/dW at the TPW with a = 0 is 1/(3.98853e-3 /K) = 250.719 K (its90-data.md)', () => {
		expect(dTdW(1, 'TPW-Ga', { a: 0 })).toBeCloseTo(1 / 3.98853e-3, 2);
	});

	it('analytic dT/dW agrees with a central difference of temperatureFromRatio', () => {
		for (const id of SUBRANGE_IDS) {
			const s = subrange(id);
			const k = SAMPLE[id];
			for (const t of [s.minKelvin + 1, (s.minKelvin + s.maxKelvin) / 2, s.maxKelvin - 1]) {
				const w = ratioFromTemperature(t, id, k);
				const h = 1e-6;
				const numeric = (temperatureFromRatio(w + h, id, k) - temperatureFromRatio(w - h, id, k)) / (2 * h);
				expect(Math.abs(dTdW(w, id, k) / numeric - 1)).toBeLessThan(1e-6);
			}
		}
	});

	it('a reading a little outside its sub-range is still reduced (documented 5 K margin)', () => {
		const k = SAMPLE['Ar-Hg-TPW'];
		const w = ratioFromTemperature(83.8058 - 0.01, 'Ar-Hg-TPW', k);
		expect(temperatureFromRatio(w, 'Ar-Hg-TPW', k)).toBeCloseTo(83.7958, 6);
		// and the reference inverse alone agrees with k = 0
		expect(referenceTemperature(referenceRatio(83.7958))).toBeCloseTo(83.7958, 9);
	});
});
