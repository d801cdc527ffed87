/**
 * Noise model of a whole plateau, for slope uncertainties over windows too short to show the slow
 * noise themselves.
 *
 * The model is white noise plus a first-order Gauss–Markov (exponentially correlated, AR(1) in
 * continuous time) part: Cov(y_i, y_j) = σw² δij + σm² exp(−|t_i − t_j| / τ). This is the usual
 * model of a regulated bath or furnace and of the slow drifts of a bridge (common practice; e.g.
 * the first-order Gauss–Markov process of inertial-sensor noise analysis, IEEE Std 952).
 *
 * Its parameters are estimated by restricted maximum likelihood (REML: Patterson & Thompson 1971,
 * Harville 1977) over the whole plateau, with a polynomial trend for the plateau curve. REML uses
 * only the contrasts of the readings that the trend cannot absorb, so the part of the slow noise
 * the polynomial follows is accounted for instead of being silently lost, which is what biases an
 * autocovariance or block variance taken about a fitted trend. On a stretch only a few correlation
 * times long, σm² and τ are poorly determined one by one, but their ratio σm²/τ (the short-lag slope
 * of the variogram) is well determined (fixed-domain asymptotics of the exponential covariance:
 * Ying 1991; Zhang 2004), and that ratio is what governs the slope of a window shorter than τ.
 *
 * The readings are first averaged into about BLOCKS blocks so that the likelihood is cheap (an m×m
 * Cholesky per trial). The covariance of the block means follows exactly from the model (the
 * exponential kernel factorises between blocks), so nothing is approximated there; white noise enters
 * a block mean as σw²/c for c readings. Noise faster than a block is seen as white, with the
 * long-run variance that matters for a slope.
 */
/** number of blocks the plateau is averaged into for the likelihood */
const BLOCKS = 120;
/** τ is searched up to this many stretch lengths: far beyond the stretch a Gauss–Markov part is a
 *  random walk over the window, and the slope variance no longer depends on τ at a fixed σm²/τ */
const TAU_MAX_SPANS = 30;
/** φ, the white share of the block-mean covariance, is searched over logit(φ) in ±LOGIT_RANGE */
const LOGIT_RANGE = 8;

export interface GaussMarkovNoise {
	/** white variance per reading (K²) */
	whiteVariance: number;
	/** stationary variance of the Gauss–Markov part (K²) */
	markovVariance: number;
	/** correlation time of the Gauss–Markov part (s) */
	tauS: number;
	/** block length and count used for the fit */
	blockS: number;
	blocks: number;
	/** length of the stretch the model was fitted over (s) */
	spanS: number;
	degree: number;
	/** the noise models tried, with their posterior weights (sum 1) */
	posterior: { whiteVariance: number; markovVariance: number; tauS: number; weight: number }[];
}

interface Blocks {
	m: number;
	c: Float64Array;
	/** reference time of each block (mean time) */
	tr: Float64Array;
	y: Float64Array;
	/** raw times and block index of each used reading */
	tt: Float64Array;
	bi: Int32Array;
}

function makeBlocks(t: ArrayLike<number>, y: ArrayLike<number>, ok: ArrayLike<number> | null, from: number, to: number, blockS: number): Blocks | null {
	const tt: number[] = [];
	const bi: number[] = [];
	const c: number[] = [];
	const st: number[] = [];
	const sy: number[] = [];
	let key = NaN;
	const t0 = t[from];
	const y0 = y[from];
	for (let k = from; k < to; k++) {
		if (ok && !ok[k]) continue;
		const kk = Math.floor((t[k] - t0) / blockS);
		if (kk !== key) {
			key = kk;
			c.push(0);
			st.push(0);
			sy.push(0);
		}
		const j = c.length - 1;
		c[j]++;
		st[j] += t[k];
		sy[j] += y[k] - y0;
		tt.push(t[k]);
		bi.push(j);
	}
	const m = c.length;
	if (m < 2) return null;
	const out: Blocks = { m, c: Float64Array.from(c), tr: new Float64Array(m), y: new Float64Array(m), tt: Float64Array.from(tt), bi: Int32Array.from(bi) };
	for (let j = 0; j < m; j++) {
		out.tr[j] = st[j] / c[j];
		out.y[j] = sy[j] / c[j];
	}
	return out;
}

/** Correlation matrix of the block means under exp(−|Δt|/τ) (unit variance), exact for the actual times. */
function markovBlockCorrelation(b: Blocks, tau: number): Float64Array {
	const { m, c, tr, tt, bi } = b;
	const a = new Float64Array(m); // mean of exp((t − T)/τ) in the block
	const d = new Float64Array(m); // mean of exp(−(t − T)/τ)
	const self = new Float64Array(m); // Σ_{i<j in block} exp(−(tj − ti)/τ)
	let decayed = 0;
	for (let k = 0; k < tt.length; k++) {
		const j = bi[k];
		const u = (tt[k] - tr[j]) / tau;
		a[j] += Math.exp(u);
		d[j] += Math.exp(-u);
		if (k > 0 && bi[k - 1] === j) {
			decayed = (decayed + 1) * Math.exp(-(tt[k] - tt[k - 1]) / tau);
			self[j] += decayed;
		} else decayed = 0;
	}
	const r = new Float64Array(m * m);
	for (let j = 0; j < m; j++) {
		a[j] /= c[j];
		d[j] /= c[j];
	}
	for (let k = 0; k < m; k++) {
		r[k * m + k] = (c[k] + 2 * self[k]) / (c[k] * c[k]);
		for (let l = k + 1; l < m; l++) {
			const v = a[k] * d[l] * Math.exp(-(tr[l] - tr[k]) / tau);
			r[k * m + l] = v;
			r[l * m + k] = v;
		}
	}
	return r;
}

/** In-place Cholesky (lower) of an m×m row-major matrix; log-determinant, or NaN if not positive definite. */
function cholesky(a: Float64Array, m: number): number {
	let logDet = 0;
	for (let j = 0; j < m; j++) {
		let s = a[j * m + j];
		for (let k = 0; k < j; k++) s -= a[j * m + k] * a[j * m + k];
		if (!(s > 0)) return NaN;
		const ljj = Math.sqrt(s);
		a[j * m + j] = ljj;
		logDet += 2 * Math.log(ljj);
		for (let i = j + 1; i < m; i++) {
			let v = a[i * m + j];
			for (let k = 0; k < j; k++) v -= a[i * m + k] * a[j * m + k];
			a[i * m + j] = v / ljj;
		}
	}
	return logDet;
}

function forwardSolve(l: Float64Array, m: number, b: Float64Array): void {
	for (let i = 0; i < m; i++) {
		let v = b[i];
		for (let k = 0; k < i; k++) v -= l[i * m + k] * b[k];
		b[i] = v / l[i * m + i];
	}
}

/**
 * Restricted log-likelihood (up to a constant) of the block means for V = (1 − φ) R(τ) + φ W, with
 * W = diag(1/c), the scale profiled out; also the profiled scale.
 */
function reml(b: Blocks, x: Float64Array[], r: Float64Array, phi: number): { ll: number; scale: number } | null {
	const m = b.m;
	const q = x.length;
	const v = new Float64Array(m * m);
	for (let k = 0; k < m * m; k++) v[k] = (1 - phi) * r[k];
	for (let k = 0; k < m; k++) v[k * m + k] += phi / b.c[k];
	const logDet = cholesky(v, m);
	if (!Number.isFinite(logDet)) return null;
	const z = Float64Array.from(b.y);
	forwardSolve(v, m, z);
	const zx = x.map((col) => {
		const w = Float64Array.from(col);
		forwardSolve(v, m, w);
		return w;
	});
	// normal equations of the GLS trend: (Z'Z) β = Z'z
	const g = new Float64Array(q * q);
	const h = new Float64Array(q);
	for (let i = 0; i < q; i++) {
		for (let j = 0; j <= i; j++) {
			let s = 0;
			for (let k = 0; k < m; k++) s += zx[i][k] * zx[j][k];
			g[i * q + j] = s;
			g[j * q + i] = s;
		}
		let s = 0;
		for (let k = 0; k < m; k++) s += zx[i][k] * z[k];
		h[i] = s;
	}
	const logDetG = cholesky(g, q);
	if (!Number.isFinite(logDetG)) return null;
	forwardSolve(g, q, h);
	let rss = 0;
	for (let k = 0; k < m; k++) rss += z[k] * z[k];
	for (let i = 0; i < q; i++) rss -= h[i] * h[i];
	const dof = m - q;
	if (!(rss > 0) || dof < 1) return null;
	const scale = rss / dof;
	return { ll: -0.5 * (dof * Math.log(scale) + logDet + logDetG), scale };
}

export interface NoiseModelOptions {
	/** polynomial degree of the trend the plateau curve is modelled by */
	degree?: number;
	/** shortest block (s) */
	minBlockS?: number;
}

/**
 * Fits the white + Gauss–Markov model to readings (t, y) over [from, to) by REML on block means,
 * over a grid of (τ, φ) with the scale profiled out. Besides the most likely model it returns the
 * whole grid weighted by its restricted likelihood (a log-uniform prior on τ and a uniform one on
 * logit φ), so that a slope variance can be averaged over the models the data cannot tell apart.
 * null when the stretch is too short for the trend and the model together.
 */
export function fitGaussMarkovNoise(
	t: ArrayLike<number>,
	y: ArrayLike<number>,
	ok: ArrayLike<number> | null,
	from: number,
	to: number,
	options: NoiseModelOptions = {}
): GaussMarkovNoise | null {
	const degree = options.degree ?? 5;
	const span = t[to - 1] - t[from];
	if (!(span > 0)) return null;
	const blockS = Math.max(span / BLOCKS, options.minBlockS ?? 0);
	const b = makeBlocks(t, y, ok, from, to, blockS);
	const q = degree + 1;
	if (!b || b.m < 3 * q + 8) return null;
	const mid = (b.tr[0] + b.tr[b.m - 1]) / 2;
	const half = (b.tr[b.m - 1] - b.tr[0]) / 2;
	const x: Float64Array[] = [];
	for (let i = 0; i < q; i++) x.push(new Float64Array(b.m));
	for (let k = 0; k < b.m; k++) {
		const u = (b.tr[k] - mid) / half;
		// Legendre polynomials by their recurrence: a well-conditioned basis for the trend
		let p0 = 1;
		let p1 = u;
		x[0][k] = 1;
		if (q > 1) x[1][k] = u;
		for (let i = 2; i < q; i++) {
			const p2 = ((2 * i - 1) * u * p1 - (i - 1) * p0) / i;
			x[i][k] = p2;
			p0 = p1;
			p1 = p2;
		}
	}
	// grid: τ log-spaced from half a block to many spans, φ (share of white in V) logit-spaced
	const taus: number[] = [];
	for (let tau = blockS / 2; tau <= TAU_MAX_SPANS * span; tau *= Math.SQRT2) taus.push(tau);
	const phis: number[] = [];
	for (let g = -LOGIT_RANGE; g <= LOGIT_RANGE; g += 1) phis.push(1 / (1 + Math.exp(-g)));
	const grid: { ll: number; tau: number; phi: number; scale: number }[] = [];
	for (const tau of taus) {
		const r = markovBlockCorrelation(b, tau);
		for (const phi of phis) {
			const f = reml(b, x, r, phi);
			if (f) grid.push({ ll: f.ll, tau, phi, scale: f.scale });
		}
	}
	if (!grid.length) return null;
	let best = grid[0];
	for (const g of grid) if (g.ll > best.ll) best = g;
	let total = 0;
	const posterior = grid.map((g) => {
		const weight = Math.exp(g.ll - best.ll);
		total += weight;
		return { whiteVariance: g.scale * g.phi, markovVariance: g.scale * (1 - g.phi), tauS: g.tau, weight };
	});
	for (const p of posterior) p.weight /= total;
	return {
		whiteVariance: best.scale * best.phi,
		markovVariance: best.scale * (1 - best.phi),
		tauS: best.tau,
		blockS,
		blocks: b.m,
		spanS: span,
		degree,
		posterior
	};
}

/**
 * Variance of the ordinary least-squares slope over readings at times t (ascending) when the noise
 * follows the model: the slope is Σ w_i y_i with w_i = (t_i − t̄)/Σ(t_k − t̄)², so its variance is
 * Σ_i Σ_j w_i w_j Cov(y_i, y_j) (the variance of a linear combination; any textbook on least
 * squares). The exponential kernel lets the double sum run in one pass: a decaying running sum of
 * the weights.
 */
export function olsSlopeVariance(t: ArrayLike<number>, noise: Pick<GaussMarkovNoise, 'whiteVariance' | 'markovVariance' | 'tauS'>): number | null {
	const n = t.length;
	if (n < 3) return null;
	let tm = 0;
	for (let i = 0; i < n; i++) tm += t[i];
	tm /= n;
	let sxx = 0;
	for (let i = 0; i < n; i++) sxx += (t[i] - tm) ** 2;
	if (!(sxx > 0)) return null;
	let sumW2 = 0;
	let cross = 0;
	let decayed = 0;
	for (let j = 0; j < n; j++) {
		const wj = (t[j] - tm) / sxx;
		if (j > 0) {
			const wPrev = (t[j - 1] - tm) / sxx;
			decayed = (decayed + wPrev) * Math.exp(-(t[j] - t[j - 1]) / noise.tauS);
			cross += wj * decayed;
		}
		sumW2 += wj * wj;
	}
	return Math.max((noise.whiteVariance + noise.markovVariance) * sumW2 + 2 * noise.markovVariance * cross, 0);
}

/**
 * Posterior mean of the OLS slope variance over the noise models of the fit: the variance of the
 * slope given the data, when the noise model itself is uncertain, is the average over the models of
 * the variance given each (law of total variance). On a stretch a few correlation times long the
 * likelihood cannot tell τ ≈ the window from τ ≫ the window, and a single most likely model then
 * often takes the slow noise for white; the average keeps both.
 */
export function averagedSlopeVariance(t: ArrayLike<number>, noise: Pick<GaussMarkovNoise, 'posterior'>): number | null {
	// white and Gauss–Markov variances enter linearly: Σw² once, the correlated sum once per τ
	const white = olsSlopeVariance(t, { whiteVariance: 1, markovVariance: 0, tauS: 1 });
	if (white === null) return null;
	let v = 0;
	const byTau = new Map<number, number | null>();
	for (const p of noise.posterior) {
		if (!(p.weight > 1e-12)) continue;
		let unit = byTau.get(p.tauS);
		if (unit === undefined) {
			unit = olsSlopeVariance(t, { whiteVariance: 0, markovVariance: 1, tauS: p.tauS });
			byTau.set(p.tauS, unit);
		}
		if (unit === null) return null;
		v += p.weight * (p.whiteVariance * white + p.markovVariance * unit);
	}
	return v;
}
