import { describe, expect, it } from 'vitest';
import { SparkBuffer, sparkPath } from './sparkline';

describe('sparkline', () => {
	it('stays bounded and keeps its first and newest points', () => {
		const b = new SparkBuffer(100);
		for (let i = 0; i < 10_000; i++) b.push(i, Math.sin(i));
		expect(b.points.length).toBeLessThanOrEqual(100);
		expect(b.points[0].t).toBe(0);
		expect(b.points.at(-1)!.t).toBe(9999);
	});

	it('ignores missing values and readings out of order', () => {
		const b = new SparkBuffer();
		b.push(1, 1);
		b.push(0, 2);
		b.push(2, null);
		expect(b.points).toEqual([{ t: 1, v: 1 }]);
	});

	it('draws within its box', () => {
		const p = sparkPath([{ t: 0, v: 0 }, { t: 10, v: 1 }], 100, 40)!;
		expect(p.d).toBe('M2.0,38.0 L98.0,2.0');
		expect(sparkPath([{ t: 0, v: 0 }], 100, 40)).toBeNull();
	});
});
