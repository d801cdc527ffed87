// The true standard uncertainty of a least-squares slope under the bridge's own noise model, so a
// detector's stated slope uncertainty can be compared with what the noise really allows.

import type { NoiseParams } from './bridge';

const S_PER_HOUR = 3600;

/**
 * Standard deviation of the ordinary least-squares slope over readings at timesS (s, ascending),
 * when each reading carries the bridge noise of `noise`: white noise plus stationary AR(1) noise
 * with correlation time τ, i.e. covariance σw² δij + σc² exp(−|ti − tj| / τ). The slope is
 * Σ wi yi with wi = (ti − t̄) / Σ (tk − t̄)², so its variance is Σi Σj wi wj Cov(yi, yj); the
 * exponential kernel lets the double sum run in one pass (a running, decaying sum of the weights).
 * Outliers are left out: a detector is expected to reject them. mK/h; null for fewer than 3 times.
 */
export function noiseSlopeStdDevMilliKelvinPerHour(timesS: ArrayLike<number>, noise: Pick<NoiseParams, 'whiteNoiseMicroKelvin' | 'correlatedNoiseMicroKelvin' | 'correlationTimeS'>): number | null {
	const n = timesS.length;
	if (n < 3) return null;
	let tm = 0;
	for (let i = 0; i < n; i++) tm += timesS[i];
	tm /= n;
	let sxx = 0;
	for (let i = 0; i < n; i++) sxx += (timesS[i] - tm) ** 2;
	if (!(sxx > 0)) return null;
	const whiteK = noise.whiteNoiseMicroKelvin * 1e-6;
	const slowK = noise.correlatedNoiseMicroKelvin * 1e-6;
	const tauS = noise.correlationTimeS;
	let sumW2 = 0;
	let cross = 0; // Σ_{i<j} wi wj exp(−(tj − ti)/τ)
	let decayed = 0; // Σ_{i<j} wi exp(−(tj − ti)/τ), carried from j − 1 to j
	for (let j = 0; j < n; j++) {
		const wj = (timesS[j] - tm) / sxx;
		if (j > 0) {
			const wPrev = (timesS[j - 1] - tm) / sxx;
			decayed = tauS > 0 ? (decayed + wPrev) * Math.exp(-(timesS[j] - timesS[j - 1]) / tauS) : 0;
			cross += wj * decayed;
		}
		sumW2 += wj * wj;
	}
	const varianceK2PerS2 = (whiteK * whiteK + slowK * slowK) * sumW2 + 2 * slowK * slowK * cross;
	return Math.sqrt(Math.max(varianceK2PerS2, 0)) * S_PER_HOUR * 1000;
}
