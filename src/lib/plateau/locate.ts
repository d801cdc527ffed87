/**
 * Where the plateau of a completed run lies: a flat core from windowed slopes, then its edges
 * refined on the readings themselves.
 *
 * - Start: the first reading after the last disturbance (nucleation, inner-interface rod, insertion,
 *   end of the approach) from which the readings stay within `bandKelvin` of the early plateau curve.
 * - End: the knee, where the readings leave the late plateau curve for good at a furnace-driven rate.
 */
import { fitLinearModel } from './stats';

export interface LocateOptions {
	direction: 1 | -1 | 0; // +1 melt (leaves upwards), −1 freeze (leaves downwards), 0 either
	flatSlopeKelvinPerS: number;
	detectWindowS: number;
	minPlateauS: number;
	bandKelvin: number;
	/** rate that marks a disturbance or the departure after the knee (K/s) */
	fastKelvinPerS: number;
	/** indices where the measuring current changes (the readings after one are on another scale) */
	switches?: readonly number[];
}

export interface Located {
	start: number;
	end: number;
	endObserved: boolean;
	coreStart: number;
	coreEnd: number;
}

/** Local slope at every reading over a centred window (two pointers and running sums, O(n)). */
export function localSlopes(t: Float64Array, y: Float64Array, ok: Uint8Array, halfWindowS: number): Float64Array {
	const n = t.length;
	const out = new Float64Array(n).fill(NaN);
	let lo = 0;
	let hi = 0; // window is [lo, hi)
	let c = 0, st = 0, sy = 0, stt = 0, sty = 0;
	const t0 = n ? t[0] : 0;
	const y0 = n ? y[0] : 0;
	const add = (j: number, s: number) => {
		if (!ok[j]) return;
		const a = t[j] - t0;
		const b = y[j] - y0;
		c += s;
		st += s * a;
		sy += s * b;
		stt += s * a * a;
		sty += s * a * b;
	};
	for (let k = 0; k < n; k++) {
		while (hi < n && t[hi] <= t[k] + halfWindowS) add(hi++, 1);
		while (lo < hi && t[lo] < t[k] - halfWindowS) add(lo++, -1);
		if (c >= 4) {
			const tm = st / c;
			const m2 = stt - tm * st;
			if (m2 > 0) out[k] = (sty - tm * sy) / m2;
		}
	}
	return out;
}

export function locatePlateau(t: Float64Array, y: Float64Array, ok: Uint8Array, o: LocateOptions): Located | null {
	const n = t.length;
	if (n < 20) return null;
	const slopes = localSlopes(t, y, ok, o.detectWindowS / 2);
	// longest run of flat readings (time gaps do not break a run: a silent bridge is not a plateau end)
	let best: [number, number] | null = null;
	let runStart = -1;
	for (let k = 0; k <= n; k++) {
		const flat = k < n && Math.abs(slopes[k]) < o.flatSlopeKelvinPerS;
		const skip = k < n && !ok[k];
		if (skip) continue;
		if (flat && runStart < 0) runStart = k;
		if (!flat && runStart >= 0) {
			const last = k - 1;
			if (!best || t[last] - t[runStart] > t[best[1]] - t[best[0]]) best = [runStart, last];
			runStart = -1;
		}
	}
	if (!best || t[best[1]] - t[best[0]] < o.minPlateauS) return null;
	const coreStart = t[best[0]];
	const coreEnd = t[best[1]];
	const fast = localSlopes(t, y, ok, 30);
	const start = refineStart(t, y, ok, fast, best[0], coreEnd, o);
	const endAt = refineEnd(t, y, ok, fast, best[1], o);
	return { start, end: endAt ?? t[n - 1], endObserved: endAt !== null, coreStart, coreEnd };
}

/** The first index whose time is at or after `time` (binary search over ascending times). */
export function indexAtOrAfter(t: Float64Array, time: number): number {
	let lo = 0;
	let hi = t.length;
	while (lo < hi) {
		const m = (lo + hi) >> 1;
		if (t[m] < time) lo = m + 1;
		else hi = m;
	}
	return lo;
}

/** Median of the usable readings k−2..k+2 (a light smoother against single noisy readings). */
function smoothAt(y: Float64Array, ok: Uint8Array, k: number): number {
	const v: number[] = [];
	for (let j = Math.max(0, k - 2); j <= Math.min(y.length - 1, k + 2); j++) if (ok[j]) v.push(y[j]);
	if (!v.length) return y[k];
	v.sort((a, b) => a - b);
	return v.length % 2 ? v[v.length >> 1] : 0.5 * (v[v.length / 2 - 1] + v[v.length / 2]);
}

function refineStart(t: Float64Array, y: Float64Array, ok: Uint8Array, fast: Float64Array, coreStartIdx: number, coreEnd: number, o: LocateOptions): number {
	// the last fast movement before the core: the disturbance the plateau recovers from
	let anchor = 0;
	for (let k = coreStartIdx; k >= 0; k--) {
		if (ok[k] && Math.abs(fast[k]) > o.fastKelvinPerS) {
			anchor = k;
			break;
		}
	}
	// Grow the plateau backwards in short steps: a local curve through the next REF_S of readings
	// is extrapolated only a little way back, so that the steep early part of a melt (Raoult, F
	// small) is followed instead of being cut off by a curve fitted far away.
	let s = t[coreStartIdx];
	for (let iter = 0; iter < 200; iter++) {
		const ref = localCurve(t, y, ok, s + GAP_S, Math.min(s + GAP_S + REF_S, coreEnd));
		if (!ref) break;
		const from = Math.max(anchor, lowerIndex(t, s - REF_S));
		const to = lowerIndex(t, s + GAP_S + REF_S);
		let inBand = 0;
		let found = -1;
		for (let k = from; k < to; k++) {
			if (!ok[k]) continue;
			if (Math.abs(smoothAt(y, ok, k) - ref(t[k])) <= o.bandKelvin) {
				if (++inBand === 1) found = k;
				if (inBand >= SETTLED_RUN) break;
			} else inBand = 0;
		}
		if (found < 0 || inBand < SETTLED_RUN) break;
		const moved = t[found] - s;
		s = t[found];
		if (Math.abs(moved) < 1 || (moved > 0 && iter > 0)) break;
	}
	// Freezes and triple points: the onset from the whole recovery after the disturbance. Not for a
	// melt: its early plateau itself rises steeply (Raoult, F small), which a relaxation onto a
	// nearly straight plateau cannot be told apart from; the melt keeps the band rule above.
	const rec = o.direction === 1 ? null : recoveryOnset(t, y, ok, anchor, s, o.bandKelvin, o.switches ?? []);
	if (rec !== null) s = rec;
	if (o.direction === 1) {
		// Melt after a warm disturbance (inner-melt heater): the sensor cools back onto the rising
		// melt curve and meets it at its lowest point; the steep early curve (F small) is too bent
		// to be followed back any further, so the minimum bounds the start.
		const a = anchor;
		const b = lowerIndex(t, s);
		let kMin = -1;
		let vMin = Infinity;
		for (let k = a; k < b; k++) {
			if (!ok[k]) continue;
			const v = smoothAt(y, ok, k);
			if (v < vMin) {
				vMin = v;
				kMin = k;
			}
		}
		if (kMin > a && kMin < b - 1 && smoothAt(y, ok, b) - vMin > o.bandKelvin) s = t[kMin];
	}
	return s;
}

/**
 * The onset from the thermometer's recovery onto the plateau. After a disturbance (recalescence,
 * insertion, an inner-interface rod) the sensor relaxes towards the cell's temperature as a
 * first-order system (Newton's law of cooling; common practice for the response of an immersed
 * thermometer), so the readings from the last fast movement to the next current change (or a gap
 * in the readings, or REF_S past the band rule's start) follow y = a + b·(t − t0) + A·exp(−(t − t0)/τ).
 * The onset is where the relaxation term has fallen to the band, t0 + τ·ln(|A| / band).
 *
 * Why not only the first readings within the band: on the recovery's slow tail the readings cross
 * the band at a few µK/s, so noise of a few tens of µK moves that crossing by tens of seconds, and
 * the reference it is measured against is a curve extrapolated back from later readings. When a
 * current switch follows the onset within a minute or two (a short freeze), the readings at the
 * onset are masked, the reference is extrapolated across the switch (on the scale of a self-heating
 * estimate that is itself least certain there), and the start either jumps past the mask or creeps
 * back down the recovery. The relaxation fit uses every reading of the recovery and needs none at the
 * onset itself. τ on a log grid (coarse, then fine), the rest by linear least squares; no fit
 * (τ at the grid's edge, no clear recovery, the onset outside the fitted readings): null, the band
 * rule stands.
 */
function recoveryOnset(t: Float64Array, y: Float64Array, ok: Uint8Array, anchor: number, s: number, band: number, switches: readonly number[]): number | null {
	if (anchor <= 0) return null; // no disturbance: nothing to recover from
	const lo = anchor + 1;
	// end: the first break in usable readings after lo, or REF_S after s
	let stop = t.length;
	for (const j of switches) if (j > lo) { stop = j; break; }
	const rows: number[] = [];
	for (let k = lo; k < stop && t[k] <= s + REF_S; k++) {
		if (k > lo && t[k] - t[k - 1] > RECOVERY_BREAK_S) break;
		if (ok[k]) rows.push(k);
	}
	if (rows.length < 20) return null;
	const t0 = t[rows[0]];
	const span = t[rows[rows.length - 1]] - t0;
	if (span < 60) return null;
	const fitAt = (tau: number) => {
		const fit = fitLinearModel(rows, (k) => [1, (t[k] - t0) / span, Math.exp(-(t[k] - t0) / tau)], y);
		if (!fit) return null;
		let rss = 0;
		for (const r of fit.residuals) rss += r * r;
		return { rss, tau, A: fit.coef[2] };
	};
	// τ: a coarse log grid, then a fine one about its best point (τ at the grid's edge: no recovery seen)
	let best: { rss: number; tau: number; A: number } | null = null;
	let edge = true;
	const coarse: number[] = [];
	for (let tau = TAU_MIN_S; tau <= span; tau *= TAU_COARSE) coarse.push(tau);
	coarse.forEach((tau, j) => {
		const f = fitAt(tau);
		if (f && (!best || f.rss < best.rss)) {
			best = f;
			edge = j === 0 || j === coarse.length - 1;
		}
	});
	if (!best || edge) return null;
	const mid = (best as { tau: number }).tau;
	for (let tau = mid / TAU_COARSE; tau <= mid * TAU_COARSE; tau *= TAU_FINE) {
		const f = fitAt(tau);
		if (f && f.rss < (best as { rss: number }).rss) best = f;
	}
	const b = best as { rss: number; tau: number; A: number };
	if (!(Math.abs(b.A) > band)) return null;
	const onset = t0 + b.tau * Math.log(Math.abs(b.A) / band);
	if (!(onset > t0 && onset < t[rows[rows.length - 1]])) return null;
	return onset;
}

const RECOVERY_BREAK_S = 120;
const TAU_MIN_S = 2;
const TAU_COARSE = 1.1;
const TAU_FINE = 1.005;

const GAP_S = 30;
const REF_S = 600;
const SETTLED_RUN = 5;

function lowerIndex(t: Float64Array, time: number): number {
	return indexAtOrAfter(t, time);
}

/** Line, or quadratic when its curvature is clear, through the usable readings in [a, b). */
function localCurve(t: Float64Array, y: Float64Array, ok: Uint8Array, a: number, b: number): ((time: number) => number) | null {
	const from = indexAtOrAfter(t, a);
	const to = indexAtOrAfter(t, b);
	const rows: number[] = [];
	for (let k = from; k < to; k++) if (ok[k]) rows.push(k);
	if (rows.length < 8) return null;
	const tc = 0.5 * (a + b);
	const h = Math.max(0.5 * (b - a), 1);
	const quad = fitLinearModel(rows, (k) => [1, (t[k] - tc) / h, ((t[k] - tc) / h) ** 2], y);
	if (quad && Math.abs(quad.coef[2]) > 3 * quad.stdErr[2]) {
		const c = quad.coef;
		return (time) => c[0] + c[1] * ((time - tc) / h) + c[2] * ((time - tc) / h) ** 2;
	}
	const lin = fitLinearModel(rows, (k) => [1, (t[k] - tc) / h], y);
	if (!lin) return null;
	const c = lin.coef;
	return (time) => c[0] + c[1] * ((time - tc) / h);
}

/**
 * The knee: first fast departure after the core (in the run's direction), then back to the newest
 * reading that still lies on the line through the 5 minutes before it.
 */
function refineEnd(t: Float64Array, y: Float64Array, ok: Uint8Array, fast: Float64Array, coreEndIdx: number, o: LocateOptions): number | null {
	const n = t.length;
	let kFast = -1;
	for (let k = coreEndIdx; k < n; k++) {
		if (!ok[k]) continue;
		const r = fast[k];
		// either way: a freeze can also end by melting back when the furnace runs away
		if (Math.abs(r) > o.fastKelvinPerS) {
			kFast = k;
			break;
		}
	}
	if (kFast < 0) return null;
	// A plateau's own roll-off can bend faster than a 5-minute curve follows (a freeze near its end):
	// a reading counts as still on the plateau if any of the shorter trailing curves predicts it.
	for (let k = kFast; k > coreEndIdx - 1 && k >= 0; k--) {
		if (!ok[k]) continue;
		const v = smoothAt(y, ok, k);
		for (const span of [300, 120, 60]) {
			const ref = localCurve(t, y, ok, t[k] - span - 10, t[k] - 10);
			if (ref && Math.abs(v - ref(t[k])) <= o.bandKelvin) return t[k];
		}
	}
	return t[kFast];
}
