import { describe, expect, it } from 'vitest';
import { controlChart, difference } from './control-chart';

describe('control chart (by hand)', () => {
	it('mean, sample σ, ±2σ and ±3σ limits and flags of a small set worked on paper', () => {
		// values 1, 2, 3, 4, 10: mean 20/5 = 4; squared deviations 9 + 4 + 1 + 0 + 36 = 50; σ = √(50/4) = √12.5 = 3.5355339
		const c = controlChart([1, 2, 3, 4, 10].map((y, i) => ({ id: i, x: i * 1000, y })));
		expect(c.mean).toBe(4);
		expect(c.sigma).toBeCloseTo(3.5355339, 7);
		expect(c.warning!.upper).toBeCloseTo(4 + 7.0710678, 6);
		expect(c.action!.lower).toBeCloseTo(4 - 10.6066017, 6);
		// 10 is 6 from the mean: 1.70 σ, inside 2σ
		expect(c.points.map((p) => p.flag)).toEqual(['in', 'in', 'in', 'in', 'in']);
	});

	it('marks a point beyond 2σ as a warning and beyond 3σ as an action', () => {
		// twelve values at 0 and ±1 alternating with one far value; flags follow |y − mean| / σ
		const ys = [0, 1, -1, 0, 1, -1, 0, 1, -1, 0, 1, -1, 0, 1, -1, 0, 1, -1, 0, 6];
		const c = controlChart(ys.map((y, i) => ({ id: i, x: i, y })));
		const mean = 6 / 20;
		const sigma = Math.sqrt(ys.reduce((s, y) => s + (y - mean) ** 2, 0) / 19);
		expect((6 - mean) / sigma).toBeGreaterThan(3);
		expect(c.points.at(-1)!.flag).toBe('action');
		const c2 = controlChart([0, 1, -1, 0, 1, -1, 0, 1, -1, 2.6].map((y, i) => ({ id: i, x: i, y })));
		// mean 0.26; deviations² sum: 3×(0.26²) + 3×(0.74²) + 3×(1.26²) + 2.34² = 0.2028 + 1.6428 + 4.7628 + 5.4756 = 12.084; σ = √(12.084/9) = 1.15873
		expect(c2.sigma).toBeCloseTo(1.15873, 4);
		expect(c2.points.at(-1)!.flag).toBe('warning'); // 2.34 / 1.15873 = 2.02 σ
	});

	it('sorts by time and gives no limits below two points', () => {
		expect(controlChart([{ id: 1, x: 5, y: 3 }]).sigma).toBeNull();
		expect(controlChart([{ id: 1, x: 5, y: 3 }, { id: 2, x: 1, y: 1 }]).points.map((p) => p.id)).toEqual([2, 1]);
		expect(controlChart([]).mean).toBeNull();
	});
});

describe('cell-to-cell difference', () => {
	it('adds the two runs’ uncertainties in quadrature (uncorrelated) and compares with k = 2', () => {
		// 0.30 − (−0.10) = 0.40 mK; u = √(0.12² + 0.16²) = 0.20 mK; U = 0.40 mK: agree (at the edge)
		const d = difference({ value: 0.3, u: 0.12 }, { value: -0.1, u: 0.16 });
		expect(d.value).toBeCloseTo(0.4, 12);
		expect(d.u).toBeCloseTo(0.2, 12);
		expect(d.agree).toBe(true);
		expect(difference({ value: 0.5, u: 0.12 }, { value: -0.1, u: 0.16 }).agree).toBe(false);
	});
});
