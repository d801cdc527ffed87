/**
 * Slope and mean with uncertainties that respect serially correlated noise, by block averaging:
 * the readings are averaged into blocks of growing length and the noise of the block means is
 * measured, with an AR(1) correction, about a smooth (quintic) curve; the largest uncertainty over
 * the block lengths is kept (the blocking method: once blocks outlast the noise's correlation time
 * the estimate stops growing). White noise plus a slow AR(1) part, as from a regulated bath,
 * defeats a lag-1 correction on the raw readings alone.
 *
 * The noise is taken about a smooth curve rather than about the fitted line because the stated slope
 * is the least-squares slope of the window: a plateau's own curvature (Raoult) is part of what that
 * slope describes, not noise, and must not widen its uncertainty. The curve is a quintic, not a
 * cubic: over 20–80 % of a freeze the liquid fraction F falls fourfold, and the Raoult shape
 * T ≈ T_pure − c/F bends too sharply for a cubic, whose misfit then passes for noise (an impure
 * cell's slope came out with a stated u tens of times its real scatter). A higher degree starts
 * to follow slow noise itself: with the 16 blocks of the coarsest level a quintic still leaves ten
 * degrees of freedom, a septic only eight, and it understated u on bath-like noise.
 */
import { averagedSlopeVariance, type GaussMarkovNoise } from './noise-model';
import { ar1Inflation, fitLine, solveLinear, type LineFit } from './stats';

const MIN_BLOCKS = 16;
/**
 * block lengths the window must hold (each with ≥ MIN_BLOCKS blocks) for its own blocking curve to
 * be trusted: the curve has to be seen to rise and level off (Flyvbjerg & Petersen 1989); with
 * fewer, the window is too short to show slow noise and the plateau's noise model is used instead
 */
export const MIN_BLOCK_LEVELS = 3;
/** degree of the smooth curve the noise is measured about (see above) */
export const TREND_DEGREE = 5;

export interface BlockedLine extends LineFit {
	/** block length that gave the stated uncertainty (s), 0 when the readings themselves did */
	blockS: number;
	/** block lengths the window's own blocking curve had */
	blockLevels: number;
	/** where the slope uncertainty comes from: the window's blocking curve, or (window too short for
	 *  one) the noise model of the whole plateau applied to the window's least-squares slope */
	slopeUncertaintySource: 'window blocks' | 'plateau noise model';
}

/** Noise of (t, y) about a polynomial of the given degree: long-run variance per point, lag-1
 *  correlation and inflation. */
export function noiseAboutTrend(
	t: ArrayLike<number>,
	y: ArrayLike<number>,
	degree: number = TREND_DEGREE
): { variance: number; rho: number; inflation: number } | null {
	const n = t.length;
	const p = degree + 1;
	if (n < 2 * p) return null;
	let tm = 0;
	for (let k = 0; k < n; k++) tm += t[k];
	tm /= n;
	let half = 0;
	for (let k = 0; k < n; k++) half = Math.max(half, Math.abs(t[k] - tm));
	if (!(half > 0)) return null;
	// powers of the time scaled to [−1, 1] keep the normal equations well conditioned
	const ata = Array.from({ length: p }, () => new Array<number>(p).fill(0));
	const atb = new Array<number>(p).fill(0);
	const y0 = y[0];
	const row = (k: number) => {
		const u = (t[k] - tm) / half;
		const d = new Array<number>(p);
		d[0] = 1;
		for (let i = 1; i < p; i++) d[i] = d[i - 1] * u;
		return d;
	};
	for (let k = 0; k < n; k++) {
		const d = row(k);
		const v = y[k] - y0;
		for (let i = 0; i < p; i++) {
			atb[i] += d[i] * v;
			for (let j = 0; j < p; j++) ata[i][j] += d[i] * d[j];
		}
	}
	const coef = solveLinear(ata, atb);
	if (!coef) return null;
	let rss = 0;
	let lag = 0;
	let prev = NaN;
	for (let k = 0; k < n; k++) {
		const d = row(k);
		let fitted = 0;
		for (let i = 0; i < p; i++) fitted += coef[i] * d[i];
		const r = y[k] - y0 - fitted;
		rss += r * r;
		if (!Number.isNaN(prev)) lag += r * prev;
		prev = r;
	}
	const { rho, factor } = ar1Inflation(rss > 0 ? lag / rss : 0, n);
	const s2 = rss / Math.max(n - p * factor, 1);
	return { variance: s2 * factor, rho, inflation: factor };
}

export function blockedLine(
	t: Float64Array,
	y: Float64Array,
	ok: Uint8Array,
	from: number,
	to: number,
	minBlockS: number,
	/** noise model of a longer stretch (the plateau), asked for only when the window is too short */
	plateauNoise?: () => GaussMarkovNoise | null
): BlockedLine | null {
	const line = fitLine(t, y, from, to, ok);
	if (!line) return null;
	const tt: number[] = [];
	const yy: number[] = [];
	for (let k = from; k < to; k++) if (ok[k]) {
		tt.push(t[k]);
		yy.push(y[k]);
	}
	let best: BlockedLine = { ...line, blockS: 0, blockLevels: 0, slopeUncertaintySource: 'window blocks' };
	const own = noiseAboutTrend(tt, yy);
	if (own) {
		best = {
			...line,
			slopeStdErr: Math.sqrt(own.variance / line.timeSpread),
			meanStdErr: Math.sqrt(own.variance / line.n),
			rho: own.rho,
			inflation: own.inflation,
			longRunVariance: own.variance,
			blockS: 0,
			blockLevels: 0,
			slopeUncertaintySource: 'window blocks'
		};
	}
	const span = line.tEnd - line.tStart;
	let levels = 0;
	for (let b = minBlockS; span / b >= MIN_BLOCKS; b *= 2) {
		const bt: number[] = [];
		const by: number[] = [];
		let key = -1;
		let c = 0, st = 0, sy = 0;
		const flush = () => {
			if (c > 0) {
				bt.push(st / c);
				by.push(sy / c);
			}
			c = st = sy = 0;
		};
		for (let k = 0; k < tt.length; k++) {
			const kk = Math.floor((tt[k] - line.tStart) / b);
			if (kk !== key) {
				flush();
				key = kk;
			}
			c++;
			st += tt[k];
			sy += yy[k];
		}
		flush();
		if (bt.length < MIN_BLOCKS) break;
		const noise = noiseAboutTrend(bt, by);
		const f = fitLine(bt, by);
		if (!noise || !f) continue;
		levels++;
		const u = Math.sqrt(noise.variance / f.timeSpread);
		if (u > best.slopeStdErr) {
			best = {
				...line,
				slopeStdErr: u,
				meanStdErr: Math.max(Math.sqrt(noise.variance / bt.length), best.meanStdErr),
				rho: noise.rho,
				inflation: Math.max((u / Math.max(line.slopeStdErr, 1e-300)) ** 2 * line.inflation, 1),
				longRunVariance: u * u * line.timeSpread,
				blockS: b,
				blockLevels: 0,
				slopeUncertaintySource: 'window blocks'
			};
		}
	}
	best.blockLevels = levels;
	if (levels < MIN_BLOCK_LEVELS && plateauNoise) {
		// the window cannot show its slow noise: take the plateau's noise model to the window's own
		// least-squares slope, never below what the window itself showed
		const model = plateauNoise();
		const v = model ? averagedSlopeVariance(tt, model) : null;
		if (v !== null && Math.sqrt(v) > best.slopeStdErr) {
			const u = Math.sqrt(v);
			best = {
				...best,
				slopeStdErr: u,
				inflation: Math.max((u / Math.max(line.slopeStdErr, 1e-300)) ** 2 * line.inflation, 1),
				longRunVariance: v * line.timeSpread,
				slopeUncertaintySource: 'plateau noise model'
			};
		}
	}
	return best;
}
