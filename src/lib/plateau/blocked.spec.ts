import { describe, expect, it } from 'vitest';
import { blockedLine, noiseAboutTrend, TREND_DEGREE } from './blocked';
import { gaussian, mulberry32 } from './synthetic';

/**
 * A strongly curved freeze window: Raoult's law T = T_pure − c/F (the liquidus depression grows as
 * 1/F, common practice for dilute impurities), with the liquid fraction F falling linearly from 0.8
 * to 0.2 over the window, as over 20–80 % of a freeze at constant heat flow. c = 1 mK gives a 3.75 mK
 * fall, about what an impure tin cell shows over four hours.
 */
function raoultWindow(seed: number, whiteK: number, slowK: number): { t: Float64Array; y: Float64Array } {
	const rand = mulberry32(seed);
	const n = 7200; // 4 h at 2 s
	const spanS = 2 * n;
	const phi = Math.exp(-2 / 600);
	const t = new Float64Array(n);
	const y = new Float64Array(n);
	let a = gaussian(rand);
	for (let i = 0; i < n; i++) {
		a = phi * a + Math.sqrt(1 - phi * phi) * gaussian(rand);
		t[i] = 2 * i;
		const liquid = 0.8 - (0.6 * t[i]) / spanS;
		y[i] = 505 - 1e-3 / liquid + whiteK * gaussian(rand) + slowK * a;
	}
	return { t, y };
}

describe('noise about the plateau trend', () => {
	it('a quintic follows the Raoult curvature of a freeze window; a cubic takes its misfit for noise', () => {
		const white = 25e-6;
		const { t, y } = raoultWindow(7, white, 0);
		expect(TREND_DEGREE).toBe(5);
		const quintic = noiseAboutTrend(t, y)!;
		const cubic = noiseAboutTrend(t, y, 3)!;
		// white noise: the long-run variance per reading is σ²
		expect(Math.sqrt(quintic.variance) / white).toBeGreaterThan(0.9);
		expect(Math.sqrt(quintic.variance) / white).toBeLessThan(1.2);
		expect(Math.sqrt(cubic.variance) / white).toBeGreaterThan(2);
	});

	it('on a curved freeze window with bath-like noise the stated slope u matches the scatter of the slope', () => {
		const slopes: number[] = [];
		const us: number[] = [];
		for (let seed = 1; seed <= 60; seed++) {
			const { t, y } = raoultWindow(500 + seed, 25e-6, 15e-6);
			const f = blockedLine(t, y, new Uint8Array(t.length).fill(1), 0, t.length, 30)!;
			slopes.push(f.slope);
			us.push(f.slopeStdErr);
		}
		const m = slopes.reduce((a, b) => a + b, 0) / slopes.length;
		const sd = Math.sqrt(slopes.reduce((a, b) => a + (b - m) ** 2, 0) / (slopes.length - 1));
		const meanU = us.reduce((a, b) => a + b, 0) / us.length;
		expect(sd / meanU).toBeGreaterThan(0.6);
		expect(sd / meanU).toBeLessThan(1.6);
	});
});
