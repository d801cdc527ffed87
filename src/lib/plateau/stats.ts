/**
 * Small statistics kit shared by the live tracker and the final analysis: robust location and
 * scale, least-squares lines, and the serial-correlation correction of a slope uncertainty.
 */

/** Consistency factor that turns a median absolute deviation into a normal standard deviation. */
export const MAD_TO_SIGMA = 1.482602218505602;

export function median(values: ArrayLike<number>): number {
	const n = values.length;
	if (n === 0) return NaN;
	const s = Float64Array.from(values as ArrayLike<number>).sort();
	const m = n >> 1;
	return n % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Robust standard deviation: 1.4826 × median |x − median|. */
export function robustSigma(values: ArrayLike<number>): number {
	const m = median(values);
	const dev = new Float64Array(values.length);
	for (let i = 0; i < values.length; i++) dev[i] = Math.abs(values[i] - m);
	return MAD_TO_SIGMA * median(dev);
}

/**
 * Variance inflation of a least-squares slope or mean when the residuals follow AR(1) with lag-1
 * correlation rho: for a smooth regressor over many correlation lengths the variance grows by
 * (1 + rho)/(1 − rho), i.e. the effective number of independent readings is n(1 − rho)/(1 + rho).
 * The lag-1 estimate from fitted residuals is biased low by about (1 + 3 rho)/n, so it is
 * corrected first; negative correlation is not credited (it would shrink the uncertainty).
 */
export function ar1Inflation(rhoHat: number, n: number): { rho: number; factor: number } {
	if (!Number.isFinite(rhoHat) || n < 4) return { rho: 0, factor: 1 };
	let rho = rhoHat + (1 + 3 * Math.max(rhoHat, 0)) / n;
	rho = Math.min(Math.max(rho, 0), 0.995);
	return { rho, factor: (1 + rho) / (1 - rho) };
}

export interface LineFit {
	n: number;
	/** time origin of the fit (mean time of the points) */
	tMean: number;
	/** value at tMean (= mean of the values) */
	mean: number;
	/** per second */
	slope: number;
	/** standard uncertainty of the slope per second, widened for serial correlation */
	slopeStdErr: number;
	/** standard uncertainty of the mean, widened for serial correlation */
	meanStdErr: number;
	/** standard deviation of the residuals about the line */
	sigma: number;
	rho: number;
	inflation: number;
	tStart: number;
	tEnd: number;
	/** Σ (t − tMean)²: with a long-run noise variance v the slope uncertainty is √(v / timeSpread) */
	timeSpread: number;
	/** long-run residual variance σ²·inflation (the variance that governs a mean or a slope) */
	longRunVariance: number;
}

/**
 * Unbiased-ish residual variance for correlated residuals: with inflation f the fit absorbs about
 * 2f of the residual sum of squares instead of 2 degrees of freedom.
 */
export function residualVariance(rss: number, n: number, inflation: number): number {
	const dof = Math.max(n - 2 * inflation, 1);
	return Math.max(rss, 0) / dof;
}

/** Ordinary least-squares line through (t[i], x[i]) for i in [from, to), with AR(1)-widened errors. */
export function fitLine(t: ArrayLike<number>, x: ArrayLike<number>, from = 0, to = t.length, mask?: ArrayLike<boolean | number>): LineFit | null {
	let n = 0;
	let st = 0;
	let sx = 0;
	for (let i = from; i < to; i++) {
		if (mask && !mask[i]) continue;
		n++;
		st += t[i];
		sx += x[i];
	}
	if (n < 3) return null;
	const tm = st / n;
	const xm = sx / n;
	let stt = 0;
	let stx = 0;
	let tStart = Infinity;
	let tEnd = -Infinity;
	for (let i = from; i < to; i++) {
		if (mask && !mask[i]) continue;
		const dt = t[i] - tm;
		stt += dt * dt;
		stx += dt * (x[i] - xm);
		if (t[i] < tStart) tStart = t[i];
		if (t[i] > tEnd) tEnd = t[i];
	}
	if (!(stt > 0)) return null;
	const b = stx / stt;
	let rss = 0;
	let lag = 0;
	let prev = NaN;
	for (let i = from; i < to; i++) {
		if (mask && !mask[i]) continue;
		const r = x[i] - xm - b * (t[i] - tm);
		rss += r * r;
		if (!Number.isNaN(prev)) lag += r * prev;
		prev = r;
	}
	const { rho, factor } = ar1Inflation(rss > 0 ? lag / rss : 0, n);
	const s2 = residualVariance(rss, n, factor);
	return {
		n,
		tMean: tm,
		mean: xm,
		slope: b,
		slopeStdErr: Math.sqrt((s2 * factor) / stt),
		meanStdErr: Math.sqrt((s2 * factor) / n),
		sigma: Math.sqrt(Math.max(rss, 0) / Math.max(n - 2, 1)),
		rho,
		inflation: factor,
		tStart,
		tEnd,
		timeSpread: stt,
		longRunVariance: s2 * factor
	};
}

/** Solves a small dense linear system in place (Gaussian elimination with partial pivoting). */
export function solveLinear(a: number[][], b: number[]): number[] | null {
	const n = b.length;
	const m = a.map((row, i) => [...row, b[i]]);
	for (let c = 0; c < n; c++) {
		let p = c;
		for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
		if (!(Math.abs(m[p][c]) > 1e-300)) return null;
		[m[c], m[p]] = [m[p], m[c]];
		for (let r = 0; r < n; r++) {
			if (r === c) continue;
			const f = m[r][c] / m[c][c];
			for (let k = c; k <= n; k++) m[r][k] -= f * m[c][k];
		}
	}
	return m.map((row, i) => row[n] / row[i]);
}

/** Inverse of a small symmetric positive matrix, or null when singular. */
export function invert(a: number[][]): number[][] | null {
	const n = a.length;
	const cols: number[][] = [];
	for (let j = 0; j < n; j++) {
		const e = Array.from({ length: n }, (_, i) => (i === j ? 1 : 0));
		const c = solveLinear(a, e);
		if (!c) return null;
		cols.push(c);
	}
	return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => cols[j][i]));
}

export interface LinearModelFit {
	coef: number[];
	stdErr: number[];
	sigma: number;
	rho: number;
	inflation: number;
	n: number;
	residuals: Float64Array;
}

/**
 * General least squares x = Σ coef_j · basis_j(i) over the given rows, with AR(1)-widened
 * standard errors (rows are assumed to be in time order for the lag-1 estimate).
 */
export function fitLinearModel(rows: number[], design: (i: number) => number[], x: ArrayLike<number>): LinearModelFit | null {
	if (rows.length === 0) return null;
	const p = design(rows[0]).length;
	if (rows.length < p + 2) return null;
	const ata = Array.from({ length: p }, () => new Array<number>(p).fill(0));
	const atb = new Array<number>(p).fill(0);
	const x0 = x[rows[0]];
	for (const i of rows) {
		const d = design(i);
		const y = x[i] - x0;
		for (let j = 0; j < p; j++) {
			atb[j] += d[j] * y;
			for (let k = 0; k < p; k++) ata[j][k] += d[j] * d[k];
		}
	}
	const inv = invert(ata);
	if (!inv) return null;
	const coefRel = inv.map((row) => row.reduce((s, v, k) => s + v * atb[k], 0));
	const residuals = new Float64Array(rows.length);
	let rss = 0;
	let lag = 0;
	rows.forEach((i, r) => {
		const d = design(i);
		let pred = 0;
		for (let j = 0; j < p; j++) pred += d[j] * coefRel[j];
		const res = x[i] - x0 - pred;
		residuals[r] = res;
		rss += res * res;
		if (r > 0) lag += res * residuals[r - 1];
	});
	const n = rows.length;
	const { rho, factor } = ar1Inflation(rss > 0 ? lag / rss : 0, n);
	const dof = Math.max(n - p * factor, 1);
	const s2 = rss / dof;
	// The first basis function is assumed to be the constant, which absorbs the x0 offset.
	const coef = coefRel.slice();
	coef[0] += x0;
	return {
		coef,
		stdErr: inv.map((row, j) => Math.sqrt(Math.max(row[j], 0) * s2 * factor)),
		sigma: Math.sqrt(rss / Math.max(n - p, 1)),
		rho,
		inflation: factor,
		n,
		residuals
	};
}

/** Finite number or null, for plain JSON outputs. */
export function finiteOrNull(v: number | null | undefined): number | null {
	return typeof v === 'number' && Number.isFinite(v) ? v : null;
}
