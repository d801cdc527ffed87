import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { SlidingFit } from './sliding-fit';
import { fitLine } from './stats';

describe('SlidingFit', () => {
	it('equals the batch least-squares line over the same window (property)', () => {
		fc.assert(
			fc.property(
				fc.array(fc.double({ min: -1e-3, max: 1e-3, noNaN: true }), { minLength: 30, maxLength: 300 }),
				fc.integer({ min: 5, max: 60 }),
				fc.double({ min: -1e-5, max: 1e-5, noNaN: true }),
				(noise, cap, slope) => {
					// the lag-1 correlation is only defined for residuals above rounding
					const tail = noise.slice(-cap);
					fc.pre(Math.max(...tail) - Math.min(...tail) > 1e-5);
					const f = new SlidingFit(cap);
					const t: number[] = [];
					const x: number[] = [];
					noise.forEach((e, i) => {
						const ti = 1e6 + i * 3 + (i % 7) * 0.1;
						const xi = 692.677 + slope * i * 3 + e;
						f.push(ti, xi);
						t.push(ti);
						x.push(xi);
					});
					const from = Math.max(0, t.length - cap);
					const a = f.line()!;
					const b = fitLine(t, x, from, t.length)!;
					expect(a.n).toBe(b.n);
					expect(a.slope).toBeCloseTo(b.slope, 9);
					expect(a.mean - b.mean).toBeLessThan(1e-9);
					expect(Math.abs(a.sigma - b.sigma)).toBeLessThan(1e-7 + 1e-3 * b.sigma);
					expect(Math.abs(a.rho - b.rho)).toBeLessThan(1e-6);
				}
			),
			{ numRuns: 60 }
		);
	});

	it('keeps its capacity and stays exact after a long run with time-based dropping', () => {
		const f = new SlidingFit(256);
		for (let i = 0; i < 100_000; i++) {
			f.push(i, 273.16 + 1e-9 * i + (i % 2 ? 1e-6 : -1e-6));
			f.dropBefore(i - 200);
		}
		expect(f.capacity).toBe(256);
		expect(f.size).toBe(201);
		expect(f.line()!.slope).toBeCloseTo(1e-9, 12);
	});

	it('a quadratic window recovers curvature', () => {
		const f = new SlidingFit(1000);
		for (let i = 0; i < 600; i++) f.push(i * 10, 505 - 1e-9 * (i * 10) ** 2);
		const q = f.quadratic()!;
		expect(q.curvature).toBeCloseTo(-2e-9, 12);
		expect(q.slopeAtEnd).toBeCloseTo(-2e-9 * 5990, 10);
	});
});
