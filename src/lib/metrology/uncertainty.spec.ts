import { describe, expect, it } from 'vitest';
import { combineBudget, type UncertaintyComponent } from './uncertainty';
import { studentCoverageFactor } from './student-t';
import { thrownCode } from './test-helpers';

const mK = 'mK';

describe('GUM combination (JCGM 100:2008), hand-computed example', () => {
	// u: A 0.10 (normal); B 0.30/√3 = 0.173205 (u² 0.03); C 0.6/√6 = 0.244949 (u² 0.06);
	// D 0.1/√2 = 0.070711 (u² 0.005); E 4 µΩ at k = 2 → 2 µΩ × 0.01 mK/µΩ = 0.02 (u² 0.0004)
	// u_c² = 0.01 + 0.03 + 0.06 + 0.005 + 0.0004 = 0.1054 → u_c = 0.324654 mK, U(k=2) = 0.649307 mK
	// ν_eff = 0.1054² / (0.10⁴/9 + 0.02⁴/4) = 0.01110916 / (1.111111e-5 + 4e-8) = 996.24
	const components: UncertaintyComponent[] = [
		{ name: 'repeatability', value: 0.1, unit: mK, distribution: 'normal', degreesOfFreedom: 9 },
		{ name: 'immersion', value: 0.3, unit: mK, distribution: 'rectangular' },
		{ name: 'impurity', value: 0.6, unit: mK, distribution: 'triangular' },
		{ name: 'bath gradient', value: 0.1, unit: mK, distribution: 'u-shaped' },
		{ name: 'R_TPW', value: 4, unit: 'µΩ', distribution: 'normal', coverageFactor: 2, sensitivity: 0.01, degreesOfFreedom: 4 }
	];
	const budget = combineBudget(components, mK);

	it('standard uncertainties and contributions', () => {
		const u = budget.components.map((c) => c.standardUncertainty);
		expect(u[0]).toBeCloseTo(0.1, 12);
		expect(u[1]).toBeCloseTo(0.173205, 6);
		expect(u[2]).toBeCloseTo(0.244949, 6);
		expect(u[3]).toBeCloseTo(0.070711, 6);
		expect(u[4]).toBeCloseTo(2, 12);
		expect(budget.components[4].contribution).toBeCloseTo(0.02, 12);
	});
	it('u_c = 0.324654 mK, U = 0.649307 mK (k = 2), ν_eff = 996.24', () => {
		expect(budget.combinedStandardUncertainty).toBeCloseTo(0.324654, 6);
		expect(budget.coverageFactor).toBe(2);
		expect(budget.expandedUncertainty).toBeCloseTo(0.649307, 6);
		expect(budget.effectiveDegreesOfFreedom).toBeCloseTo(996.24, 2);
		expect(budget.unit).toBe(mK);
	});
	it('a negative sensitivity counts by its magnitude', () => {
		const flipped = combineBudget([{ ...components[4], sensitivity: -0.01 }], mK);
		expect(flipped.components[0].contribution).toBeCloseTo(0.02, 12);
	});
	it('divisor overrides the distribution default', () => {
		const b = combineBudget([{ name: 'x', value: 0.3, unit: mK, distribution: 'normal', divisor: 3 }], mK);
		expect(b.combinedStandardUncertainty).toBeCloseTo(0.1, 12);
	});
});

describe('Welch–Satterthwaite (GUM G.2b)', () => {
	it('two equal components with ν = 4 each: ν_eff = (2u²)²/(2u⁴/4) = 8', () => {
		const b = combineBudget(
			[
				{ name: 'a', value: 1, unit: mK, distribution: 'normal', degreesOfFreedom: 4 },
				{ name: 'b', value: 1, unit: mK, distribution: 'normal', degreesOfFreedom: 4 }
			],
			mK
		);
		expect(b.effectiveDegreesOfFreedom).toBeCloseTo(8, 12);
	});
	it('one finite-ν component alone keeps its ν; all infinite gives ∞', () => {
		expect(combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'normal', degreesOfFreedom: 5 }], mK).effectiveDegreesOfFreedom).toBeCloseTo(5, 12);
		expect(combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'rectangular' }], mK).effectiveDegreesOfFreedom).toBe(Infinity);
	});
});

describe('Student-t coverage factor (GUM Table G.2, memory)', () => {
	it.each([
		[0.9545, 1, 13.97],
		[0.9545, 2, 4.53],
		[0.9545, 5, 2.65],
		[0.9545, 10, 2.28],
		[0.9545, Infinity, 2.0],
		[0.95, 10, 2.23],
		[0.95, Infinity, 1.96],
		[0.99, 3, 5.84]
	])('p = %f, ν = %f: t = %f', (p, nu, t) => {
		expect(studentCoverageFactor(p, nu)).toBeCloseTo(t, 2);
	});
	it('fractional ν is truncated (GUM G.6.4): ν = 5.9 uses ν = 5', () => {
		expect(studentCoverageFactor(0.9545, 5.9)).toBe(studentCoverageFactor(0.9545, 5));
	});
	it('combineBudget with { coverageProbability } uses k = t_p(ν_eff)', () => {
		const b = combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'normal', degreesOfFreedom: 2 }], mK, { coverageProbability: 0.9545 });
		expect(b.coverageFactor).toBeCloseTo(4.53, 2);
		expect(b.expandedUncertainty).toBeCloseTo(4.53, 2);
	});
});

describe('budget input checks', () => {
	it('rejects an empty budget, negative values, bad divisors and coverage factors on non-normal components', () => {
		expect(thrownCode(() => combineBudget([], mK))).toBe('invalid_input');
		expect(thrownCode(() => combineBudget([{ name: 'a', value: -1, unit: mK, distribution: 'normal' }], mK))).toBe('invalid_input');
		expect(thrownCode(() => combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'normal', divisor: 0 }], mK))).toBe('invalid_input');
		expect(thrownCode(() => combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'rectangular', coverageFactor: 2 }], mK))).toBe('invalid_input');
		expect(thrownCode(() => combineBudget([{ name: 'a', value: Number.NaN, unit: mK, distribution: 'normal' }], mK))).toBe('invalid_input');
		expect(thrownCode(() => combineBudget([{ name: 'a', value: 1, unit: mK, distribution: 'gaussian' as never }], mK))).toBe('unknown_id');
	});
});
