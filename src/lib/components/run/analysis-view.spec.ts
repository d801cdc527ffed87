import { describe, expect, it } from 'vitest';
import { combineBudget } from '$lib/metrology/index';
import { budgetRows, molFractionText } from './analysis-view';

describe('analysis tables', () => {
	it('gives each budget line its divisor, standard uncertainty and share', () => {
		const b = combineBudget([
			{ name: 'a', value: 0.03, unit: 'mK', distribution: 'normal' },
			{ name: 'b', value: 0.04 * Math.sqrt(3), unit: 'mK', distribution: 'rectangular' }
		], 'mK');
		const rows = budgetRows(b);
		expect(rows[0].divisor).toBe(1);
		expect(rows[1].divisor).toBeCloseTo(Math.sqrt(3), 12);
		expect(rows[1].standardUncertainty).toBeCloseTo(0.04, 12);
		expect(b.combinedStandardUncertainty).toBeCloseTo(0.05, 12);
		expect(rows[0].share + rows[1].share).toBeCloseTo(1, 12);
	});

	it('writes impurity in µmol/mol', () => {
		expect(molFractionText(2.5e-7)).toBe('0.250 µmol/mol');
		expect(molFractionText(null)).toBe('—');
	});
});
