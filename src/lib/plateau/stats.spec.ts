import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { ar1Inflation, fitLine, median, robustSigma } from './stats';
import { blockedLine } from './blocked';
import { gaussian, mulberry32 } from './synthetic';

function ratioOfScatterToStated(slopes: number[], us: number[]): number {
	const m = slopes.reduce((a, b) => a + b, 0) / slopes.length;
	const sd = Math.sqrt(slopes.reduce((a, b) => a + (b - m) ** 2, 0) / (slopes.length - 1));
	return sd / (us.reduce((a, b) => a + b, 0) / us.length);
}

describe('robust location and scale', () => {
	it('median is order-free and lies between min and max', () => {
		fc.assert(
			fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 50 }), (xs) => {
				const m = median(xs);
				expect(m).toBeGreaterThanOrEqual(Math.min(...xs));
				expect(m).toBeLessThanOrEqual(Math.max(...xs));
				expect(median([...xs].reverse())).toBe(m);
			})
		);
	});
	it('robust sigma ignores a minority of wild values', () => {
		const rand = mulberry32(3);
		const xs = Array.from({ length: 2000 }, () => gaussian(rand));
		for (let k = 0; k < 100; k++) xs[k * 20] = 1e3;
		expect(robustSigma(xs)).toBeGreaterThan(0.9);
		expect(robustSigma(xs)).toBeLessThan(1.15);
	});
});

describe('serial-correlation correction', () => {
	it('inflation is 1 for uncorrelated residuals and grows with rho', () => {
		expect(ar1Inflation(-0.2, 500).factor).toBe(1);
		expect(ar1Inflation(0.5, 1e6).factor).toBeCloseTo(3, 2);
		expect(ar1Inflation(0.9, 1e6).factor).toBeCloseTo(19, 0);
	});

	it('AR(1) noise: stated slope u matches the scatter of slope estimates (0.6–1.6) and is wider than the white-noise u', () => {
		for (const rho of [0.5, 0.8]) {
			const slopes: number[] = [];
			const us: number[] = [];
			let white = 0;
			for (let seed = 1; seed <= 300; seed++) {
				const rand = mulberry32(seed);
				const t: number[] = [];
				const x: number[] = [];
				let e = 0;
				for (let i = 0; i < 400; i++) {
					e = rho * e + Math.sqrt(1 - rho * rho) * gaussian(rand);
					t.push(i * 5);
					x.push(300 + 1e-7 * i * 5 + 5e-5 * e);
				}
				const f = fitLine(t, x)!;
				slopes.push(f.slope);
				us.push(f.slopeStdErr);
				white += f.sigma / Math.sqrt(f.timeSpread) / 300;
			}
			const r = ratioOfScatterToStated(slopes, us);
			expect(r).toBeGreaterThan(0.6);
			expect(r).toBeLessThan(1.6);
			expect(us.reduce((a, b) => a + b, 0) / 300).toBeGreaterThan(1.5 * white);
		}
	});

	it('white plus slow AR(1) noise (a regulated bath): block averaging keeps the stated u honest', () => {
		const slopes: number[] = [];
		const us: number[] = [];
		const phi = Math.exp(-2 / 600);
		for (let seed = 1; seed <= 120; seed++) {
			const rand = mulberry32(1000 + seed);
			const n = 7200; // 4 h at 2 s
			const t = new Float64Array(n);
			const y = new Float64Array(n);
			let a = gaussian(rand);
			for (let i = 0; i < n; i++) {
				a = phi * a + Math.sqrt(1 - phi * phi) * gaussian(rand);
				t[i] = i * 2;
				y[i] = 505 + 25e-6 * gaussian(rand) + 15e-6 * a;
			}
			const f = blockedLine(t, y, new Uint8Array(n).fill(1), 0, n, 30)!;
			slopes.push(f.slope);
			us.push(f.slopeStdErr);
		}
		const r = ratioOfScatterToStated(slopes, us);
		expect(r).toBeGreaterThan(0.6);
		expect(r).toBeLessThan(1.6);
	});
});
