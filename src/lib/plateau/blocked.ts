/**
 * Slope and mean with uncertainties that respect serially correlated noise, by block averaging:
 * the readings are averaged into blocks of growing length and the noise of the block means is
 * measured, with an AR(1) correction, about a smooth (cubic) curve; the largest uncertainty over
 * the block lengths is kept (the blocking method: once blocks outlast the noise's correlation time
 * the estimate stops growing). White noise plus a slow AR(1) part, as from a regulated bath,
 * defeats a lag-1 correction on the raw readings alone.
 *
 * The noise is taken about a cubic rather than about the fitted line because the stated slope is
 * the least-squares slope of the window: a plateau's own curvature (Raoult) is part of what that
 * slope describes, not noise, and must not widen its uncertainty.
 */
import { ar1Inflation, fitLine, type LineFit } from './stats';

const MIN_BLOCKS = 16;

export interface BlockedLine extends LineFit {
	/** block length that gave the stated uncertainty (s), 0 when the readings themselves did */
	blockS: number;
}

/** Noise of (t, y) about a cubic: long-run variance per point, lag-1 correlation and inflation. */
export function noiseAboutCubic(t: ArrayLike<number>, y: ArrayLike<number>): { variance: number; rho: number; inflation: number } | null {
	const n = t.length;
	if (n < 8) return null;
	let tm = 0;
	for (let k = 0; k < n; k++) tm += t[k];
	tm /= n;
	let half = 0;
	for (let k = 0; k < n; k++) half = Math.max(half, Math.abs(t[k] - tm));
	if (!(half > 0)) return null;
	// Legendre-like scaled powers keep the normal equations well conditioned
	const p = 4;
	const ata = Array.from({ length: p }, () => new Array<number>(p).fill(0));
	const atb = new Array<number>(p).fill(0);
	const y0 = y[0];
	const row = (k: number) => {
		const u = (t[k] - tm) / half;
		return [1, u, u * u, u * u * u];
	};
	for (let k = 0; k < n; k++) {
		const d = row(k);
		const v = y[k] - y0;
		for (let i = 0; i < p; i++) {
			atb[i] += d[i] * v;
			for (let j = 0; j < p; j++) ata[i][j] += d[i] * d[j];
		}
	}
	const coef = solve4(ata, atb);
	if (!coef) return null;
	let rss = 0;
	let lag = 0;
	let prev = NaN;
	for (let k = 0; k < n; k++) {
		const d = row(k);
		const r = y[k] - y0 - (coef[0] * d[0] + coef[1] * d[1] + coef[2] * d[2] + coef[3] * d[3]);
		rss += r * r;
		if (!Number.isNaN(prev)) lag += r * prev;
		prev = r;
	}
	const { rho, factor } = ar1Inflation(rss > 0 ? lag / rss : 0, n);
	const s2 = rss / Math.max(n - p * factor, 1);
	return { variance: s2 * factor, rho, inflation: factor };
}

function solve4(a: number[][], b: number[]): number[] | null {
	const n = b.length;
	const m = a.map((r, i) => [...r, b[i]]);
	for (let c = 0; c < n; c++) {
		let piv = c;
		for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[piv][c])) piv = r;
		if (!(Math.abs(m[piv][c]) > 0)) return null;
		[m[c], m[piv]] = [m[piv], m[c]];
		for (let r = 0; r < n; r++) {
			if (r === c) continue;
			const f = m[r][c] / m[c][c];
			for (let k = c; k <= n; k++) m[r][k] -= f * m[c][k];
		}
	}
	return m.map((r, i) => r[n] / r[i]);
}

export function blockedLine(
	t: Float64Array,
	y: Float64Array,
	ok: Uint8Array,
	from: number,
	to: number,
	minBlockS: number
): BlockedLine | null {
	const line = fitLine(t, y, from, to, ok);
	if (!line) return null;
	const tt: number[] = [];
	const yy: number[] = [];
	for (let k = from; k < to; k++) if (ok[k]) {
		tt.push(t[k]);
		yy.push(y[k]);
	}
	let best: BlockedLine = { ...line, blockS: 0 };
	const own = noiseAboutCubic(tt, yy);
	if (own) {
		best = {
			...line,
			slopeStdErr: Math.sqrt(own.variance / line.timeSpread),
			meanStdErr: Math.sqrt(own.variance / line.n),
			rho: own.rho,
			inflation: own.inflation,
			longRunVariance: own.variance,
			blockS: 0
		};
	}
	const span = line.tEnd - line.tStart;
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
		const noise = noiseAboutCubic(bt, by);
		const f = fitLine(bt, by);
		if (!noise || !f) continue;
		const u = Math.sqrt(noise.variance / f.timeSpread);
		if (u > best.slopeStdErr) {
			best = {
				...line,
				slopeStdErr: u,
				meanStdErr: Math.max(Math.sqrt(noise.variance / bt.length), best.meanStdErr),
				rho: noise.rho,
				inflation: Math.max((u / Math.max(line.slopeStdErr, 1e-300)) ** 2 * line.inflation, 1),
				longRunVariance: u * u * line.timeSpread,
				blockS: b
			};
		}
	}
	return best;
}
