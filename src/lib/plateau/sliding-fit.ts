import { PairRing } from './ring';
import { ar1Inflation, residualVariance, type LineFit } from './stats';

/**
 * Least-squares line (and optional quadratic) over a sliding window of readings, updated in O(1)
 * per reading from running sums. Besides the usual sums it keeps sums over neighbouring pairs so
 * that the lag-1 autocorrelation of the *fitted* residuals is known exactly at any moment: this is
 * what lets the stated slope uncertainty widen when bath regulation makes neighbouring readings alike.
 *
 * Sums are taken about a reference point (t0, x0) that is moved to the oldest reading whenever the
 * whole window has turned over, so rounding never accumulates beyond one window's worth.
 */
export class SlidingFit {
	private readonly ring: PairRing;
	private t0 = 0;
	private x0 = 0;
	private n = 0;
	private st = 0;
	private sx = 0;
	private stt = 0;
	private stx = 0;
	private sxx = 0;
	private st3 = 0;
	private st4 = 0;
	private st2x = 0;
	// neighbouring pairs (previous, current)
	private np = 0;
	private pxx = 0;
	private ptx = 0;
	private ptt = 0;
	private px = 0;
	private pt = 0;
	private sinceRebuild = 0;
	/** the line of the present window, computed at most once between changes */
	private memo: LineFit | null | undefined = undefined;

	constructor(capacity: number) {
		this.ring = new PairRing(capacity);
	}

	get size(): number {
		return this.ring.size;
	}
	get capacity(): number {
		return this.ring.capacity;
	}
	oldestTime(): number {
		return this.ring.size ? this.ring.t(0) : NaN;
	}
	newestTime(): number {
		return this.ring.size ? this.ring.t(this.ring.size - 1) : NaN;
	}
	/** Read access for one-off scans (k = 0 is the oldest). */
	timeAt(k: number): number {
		return this.ring.t(k);
	}
	valueAt(k: number): number {
		return this.ring.x(k);
	}

	clear(): void {
		this.ring.clear();
		this.zero();
	}

	private zero(): void {
		this.memo = undefined;
		this.n = this.st = this.sx = this.stt = this.stx = this.sxx = this.st3 = this.st4 = this.st2x = 0;
		this.np = this.pxx = this.ptx = this.ptt = this.px = this.pt = 0;
	}

	private addPoint(dt: number, dx: number, sign: 1 | -1): void {
		const dt2 = dt * dt;
		this.n += sign;
		this.st += sign * dt;
		this.sx += sign * dx;
		this.stt += sign * dt2;
		this.stx += sign * dt * dx;
		this.sxx += sign * dx * dx;
		this.st3 += sign * dt2 * dt;
		this.st4 += sign * dt2 * dt2;
		this.st2x += sign * dt2 * dx;
	}

	private addPair(ta: number, xa: number, tb: number, xb: number, sign: 1 | -1): void {
		this.np += sign;
		this.pxx += sign * xa * xb;
		this.ptx += sign * (ta * xb + tb * xa);
		this.ptt += sign * ta * tb;
		this.px += sign * (xa + xb);
		this.pt += sign * (ta + tb);
	}

	push(t: number, x: number): void {
		this.memo = undefined;
		if (this.ring.full) this.shift();
		const dt = t - this.t0;
		const dx = x - this.x0;
		if (this.ring.size > 0) {
			const k = this.ring.size - 1;
			this.addPair(this.ring.t(k) - this.t0, this.ring.x(k) - this.x0, dt, dx, 1);
		} else {
			// empty window: restart the reference here
			this.t0 = t;
			this.x0 = x;
			this.zero();
			this.ring.push(t, x);
			this.addPoint(0, 0, 1);
			this.sinceRebuild = 0;
			return;
		}
		this.ring.push(t, x);
		this.addPoint(dt, dx, 1);
		if (++this.sinceRebuild >= Math.max(this.ring.size, 64)) this.rebuild();
	}

	/** Drops the oldest reading. */
	shift(): void {
		this.memo = undefined;
		const size = this.ring.size;
		if (size === 0) return;
		const ta = this.ring.t(0) - this.t0;
		const xa = this.ring.x(0) - this.x0;
		this.addPoint(ta, xa, -1);
		if (size >= 2) this.addPair(ta, xa, this.ring.t(1) - this.t0, this.ring.x(1) - this.x0, -1);
		this.ring.shift();
		if (this.ring.size === 0) this.zero();
	}

	/** Drops readings older than tMin. */
	dropBefore(tMin: number): void {
		while (this.ring.size > 0 && this.ring.t(0) < tMin) this.shift();
	}

	/** Recomputes every sum from the window about a fresh reference (amortised O(1)). */
	rebuild(): void {
		this.sinceRebuild = 0;
		const size = this.ring.size;
		this.zero();
		if (size === 0) return;
		this.t0 = this.ring.t(0);
		this.x0 = this.ring.x(0);
		let pt = 0;
		let px = 0;
		for (let k = 0; k < size; k++) {
			const dt = this.ring.t(k) - this.t0;
			const dx = this.ring.x(k) - this.x0;
			this.addPoint(dt, dx, 1);
			if (k > 0) this.addPair(pt, px, dt, dx, 1);
			pt = dt;
			px = dx;
		}
	}

	/** Line through the window, or null with fewer than 3 readings or no time spread. */
	line(): LineFit | null {
		if (this.memo === undefined) this.memo = this.computeLine();
		return this.memo;
	}

	private computeLine(): LineFit | null {
		const n = this.n;
		if (n < 3) return null;
		const tm = this.st / n;
		const xm = this.sx / n;
		const m2 = this.stt - tm * this.st;
		if (!(m2 > 0)) return null;
		const sux = this.stx - tm * this.sx;
		const b = sux / m2;
		const sxxc = this.sxx - xm * this.sx;
		const rss = Math.max(sxxc - b * sux, 0);
		// intercept at t = 0 of the shifted clock
		const a = xm - b * tm;
		const lag =
			this.pxx - a * this.px - b * this.ptx + a * a * this.np + a * b * this.pt + b * b * this.ptt;
		const { rho, factor } = ar1Inflation(rss > 0 ? lag / rss : 0, n);
		const s2 = residualVariance(rss, n, factor);
		return {
			n,
			tMean: tm + this.t0,
			mean: xm + this.x0,
			slope: b,
			slopeStdErr: Math.sqrt((s2 * factor) / m2),
			meanStdErr: Math.sqrt((s2 * factor) / n),
			sigma: Math.sqrt(rss / Math.max(n - 2, 1)),
			rho,
			inflation: factor,
			tStart: this.oldestTime(),
			tEnd: this.newestTime(),
			timeSpread: m2,
			longRunVariance: s2 * factor
		};
	}

	/**
	 * Quadratic x = mean + b·u + c·(u² − <u²>) with u = t − tMean. Returns the slope and the
	 * second derivative at the newest reading with standard errors (the AR(1) inflation of the
	 * line fit is reused: a close enough measure of the same noise).
	 */
	quadratic(): { slopeAtEnd: number; slopeAtEndStdErr: number; curvature: number; curvatureStdErr: number } | null {
		const n = this.n;
		if (n < 8) return null;
		const line = this.line();
		if (!line) return null;
		const tm = this.st / n;
		const xm = this.sx / n;
		const m2 = this.stt - tm * this.st;
		const m3 = this.st3 - 3 * tm * this.stt + 3 * tm * tm * this.st - n * tm * tm * tm;
		const m4 =
			this.st4 - 4 * tm * this.st3 + 6 * tm * tm * this.stt - 4 * tm * tm * tm * this.st + n * tm * tm * tm * tm;
		const sux = this.stx - tm * this.sx;
		const su2x = this.st2x - 2 * tm * this.stx + tm * tm * this.sx - xm * m2;
		const a11 = m2;
		const a12 = m3;
		const a22 = m4 - (m2 * m2) / n;
		const det = a11 * a22 - a12 * a12;
		if (!(det > 0) || !(a22 > 0)) return null;
		const b = (a22 * sux - a12 * su2x) / det;
		const c = (a11 * su2x - a12 * sux) / det;
		const sxxc = this.sxx - xm * this.sx;
		const rss = Math.max(sxxc - b * sux - c * su2x, 0);
		const factor = line.inflation;
		const s2 = (rss / Math.max(n - 3 * factor, 1)) * factor;
		const vbb = (a22 / det) * s2;
		const vcc = (a11 / det) * s2;
		const vbc = (-a12 / det) * s2;
		const uEnd = this.newestTime() - this.t0 - tm;
		const slopeAtEnd = b + 2 * c * uEnd;
		const varSlope = vbb + 4 * uEnd * uEnd * vcc + 4 * uEnd * vbc;
		return {
			slopeAtEnd,
			slopeAtEndStdErr: Math.sqrt(Math.max(varSlope, 0)),
			curvature: 2 * c,
			curvatureStdErr: 2 * Math.sqrt(Math.max(vcc, 0))
		};
	}

	toJSON(): { t: number[]; x: number[] } {
		return this.ring.toJSON();
	}

	static fromJSON(capacity: number, data: { t: number[]; x: number[] }): SlidingFit {
		const f = new SlidingFit(capacity);
		const n = Math.min(data.t.length, data.x.length);
		for (let k = Math.max(0, n - capacity); k < n; k++) f.push(data.t[k], data.x[k]);
		return f;
	}
}
