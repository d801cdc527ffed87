import { describe, expect, it } from 'vitest';
import { Ar1 } from './bridge';
import { noiseSlopeStdDevMilliKelvinPerHour } from './noise-slope';
import { createRng } from './prng';

describe('true standard uncertainty of a least-squares slope under the bridge noise', () => {
	it('white noise only: σ / √Σ(t − t̄)² (the ordinary least-squares result, common practice)', () => {
		const t = Array.from({ length: 500 }, (_, i) => 2 * i);
		const tm = t.reduce((a, b) => a + b, 0) / t.length;
		const sxx = t.reduce((a, b) => a + (b - tm) ** 2, 0);
		const u = noiseSlopeStdDevMilliKelvinPerHour(t, { whiteNoiseMicroKelvin: 25, correlatedNoiseMicroKelvin: 0, correlationTimeS: 600 })!;
		expect(u).toBeCloseTo((25e-6 / Math.sqrt(sxx)) * 3600 * 1000, 12);
	});

	it('white plus AR(1): agrees with the scatter of slopes fitted to the bridge’s own noise generator', () => {
		const noise = { whiteNoiseMicroKelvin: 25, correlatedNoiseMicroKelvin: 15, correlationTimeS: 600 };
		// uneven times with a gap, as a dropout leaves them
		const t: number[] = [];
		for (let s = 0; s < 7200; s += 10) if (s < 3000 || s > 3600) t.push(s);
		const tm = t.reduce((a, b) => a + b, 0) / t.length;
		const sxx = t.reduce((a, b) => a + (b - tm) ** 2, 0);
		const rng = createRng(5, 'noise-slope-test');
		const slopes: number[] = [];
		for (let rep = 0; rep < 600; rep++) {
			const ar = new Ar1(noise.correlatedNoiseMicroKelvin, noise.correlationTimeS, rng.fork(`ar-${rep}`));
			const white = rng.fork(`white-${rep}`);
			let sxy = 0;
			let prev = t[0];
			for (let i = 0; i < t.length; i++) {
				const slow = ar.next(i === 0 ? 0 : t[i] - prev); // dt 0 keeps the stationary start draw
				prev = t[i];
				sxy += (t[i] - tm) * (noise.whiteNoiseMicroKelvin * white.normal() + slow) * 1e-6;
			}
			slopes.push((sxy / sxx) * 3600 * 1000);
		}
		const m = slopes.reduce((a, b) => a + b, 0) / slopes.length;
		const sd = Math.sqrt(slopes.reduce((a, b) => a + (b - m) ** 2, 0) / (slopes.length - 1));
		const u = noiseSlopeStdDevMilliKelvinPerHour(t, noise)!;
		// 600 draws: the sample sd is within ±10 % of the true one with > 99 % probability
		expect(sd / u).toBeGreaterThan(0.9);
		expect(sd / u).toBeLessThan(1.1);
		// and the slow part matters: white noise alone would claim far less
		expect(noiseSlopeStdDevMilliKelvinPerHour(t, { ...noise, correlatedNoiseMicroKelvin: 0 })! / u).toBeLessThan(0.5);
	});
});
