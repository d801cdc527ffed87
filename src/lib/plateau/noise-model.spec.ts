import { describe, expect, it } from 'vitest';
import { blockedLine } from './blocked';
import { fitGaussMarkovNoise, olsSlopeVariance } from './noise-model';
import { gaussian, mulberry32 } from './synthetic';

/** White noise plus stationary Gauss–Markov (AR(1)) noise with correlation time tauS on a gentle trend. */
function gaussMarkovRun(seed: number, n: number, dtS: number, whiteK: number, slowK: number, tauS: number) {
	const rand = mulberry32(seed);
	const phi = Math.exp(-dtS / tauS);
	const t = new Float64Array(n);
	const y = new Float64Array(n);
	let a = gaussian(rand);
	for (let i = 0; i < n; i++) {
		a = phi * a + Math.sqrt(1 - phi * phi) * gaussian(rand);
		t[i] = i * dtS;
		y[i] = 429.7485 - 4e-7 * t[i] - 1e-11 * t[i] * t[i] + whiteK * gaussian(rand) + slowK * a;
	}
	return { t, y };
}

describe('slope variance under a white + Gauss–Markov model', () => {
	// Var(Σ w_i y_i) = Σ Σ w_i w_j Cov(y_i, y_j): the variance of a linear combination (common practice).
	it('the one-pass sum equals the double sum Σ Σ w_i w_j Cov(y_i, y_j)', () => {
		const t = [0, 1, 2.5, 4, 7, 7.5, 11, 12, 15, 20];
		const m = { whiteVariance: 2, markovVariance: 3, tauS: 4 };
		const tm = t.reduce((p, q) => p + q, 0) / t.length;
		const sxx = t.reduce((p, q) => p + (q - tm) ** 2, 0);
		let v = 0;
		for (const ti of t) for (const tj of t) v += (((ti - tm) / sxx) * (tj - tm)) / sxx * ((ti === tj ? m.whiteVariance : 0) + m.markovVariance * Math.exp(-Math.abs(ti - tj) / m.tauS));
		expect(olsSlopeVariance(t, m)! / v).toBeCloseTo(1, 10);
	});

	// REML: Patterson & Thompson, Biometrika 58 (1971) 545; no published value is checked here, the truth is
	// the synthetic record's own τ and σm²/τ.
	it('REML over a long record finds the correlation time and the ratio σm²/τ', () => {
		const { t, y } = gaussMarkovRun(3, 14400, 2, 25e-6, 15e-6, 600);
		const m = fitGaussMarkovNoise(t, y, null, 0, t.length, { degree: 7 })!;
		expect(m.tauS).toBeGreaterThan(300);
		expect(m.tauS).toBeLessThan(1200);
		const d = m.markovVariance / m.tauS / ((15e-6) ** 2 / 600);
		expect(d).toBeGreaterThan(0.7);
		expect(d).toBeLessThan(1.4);
	});
});

describe('a slope window too short to show its slow noise', () => {
	// a 25-min plateau at 1 s, 15-min window (20–80 %), bath-like noise with τ = 600 s: the window's own
	// blocks (30 s, one level) see almost only the white part
	const n = 1500;
	const from = 300;
	const to = 1200;
	const runs = Array.from({ length: 40 }, (_, k) => gaussMarkovRun(9000 + k, n, 1, 25e-6, 15e-6, 600));
	const scatter = (stated: (r: (typeof runs)[number]) => { slope: number; u: number }) => {
		const out = runs.map(stated);
		const m = out.reduce((p, q) => p + q.slope, 0) / out.length;
		const sd = Math.sqrt(out.reduce((p, q) => p + (q.slope - m) ** 2, 0) / (out.length - 1));
		const rmsU = Math.sqrt(out.reduce((p, q) => p + q.u * q.u, 0) / out.length);
		return sd / rmsU;
	};
	const ok = new Uint8Array(n).fill(1);

	it('the window alone understates u several times (the limit this model removes)', () => {
		const r = scatter(({ t, y }) => {
			const f = blockedLine(t, y, ok, from, to, 30)!;
			expect(f.slopeUncertaintySource).toBe('window blocks');
			return { slope: f.slope, u: f.slopeStdErr };
		});
		expect(r).toBeGreaterThan(2.5);
	});

	it('with the noise model of the 10–90 % stretch the stated u matches the Monte-Carlo scatter of the slope', () => {
		const r = scatter(({ t, y }) => {
			const f = blockedLine(t, y, ok, from, to, 30, () => fitGaussMarkovNoise(t, y, null, 150, 1350, { degree: 7 }))!;
			expect(f.blockLevels).toBeLessThan(3);
			return { slope: f.slope, u: f.slopeStdErr };
		});
		expect(r).toBeGreaterThan(0.67);
		expect(r).toBeLessThan(1.5);
	}, 60_000);

	it('a long window keeps its own blocking curve and never asks for the model', () => {
		const { t, y } = gaussMarkovRun(5, 14400, 2, 25e-6, 15e-6, 600);
		let asked = false;
		const f = blockedLine(t, y, new Uint8Array(t.length).fill(1), 0, t.length, 30, () => {
			asked = true;
			return null;
		})!;
		expect(f.blockLevels).toBeGreaterThanOrEqual(3);
		expect(asked).toBe(false);
		expect(f.slopeUncertaintySource).toBe('window blocks');
	});
});
