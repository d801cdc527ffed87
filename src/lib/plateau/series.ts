/**
 * Preparation of a completed run for the final analysis: clean arrays, current segments,
 * outlier and settling masks. Everything here is O(n) or O(n log w) with a small window w.
 */
import { median, robustSigma } from './stats';
import { sameCurrent } from './current-step';
import type { Sample } from './types';

export interface RunSeries {
	t: Float64Array;
	x: Float64Array;
	/** current of each reading, mA (NaN when the run states none) */
	i: Float64Array;
	/** reading usable for fits: not an outlier and not settling after a current change */
	ok: Uint8Array;
	outlier: Uint8Array;
	/** indices where a new current setting begins */
	switches: number[];
	medianDtS: number;
	noiseSigma: number;
}

/** Sorts, drops non-finite and repeated times, fills missing currents from the previous reading. */
export function prepareSeries(samples: readonly Sample[], settleS: number, outlierSigma: number): RunSeries {
	const clean = samples.filter((s) => s && Number.isFinite(s.t) && Number.isFinite(s.kelvin));
	const sorted = clean.every((s, k) => k === 0 || s.t > clean[k - 1].t) ? clean : [...clean].sort((a, b) => a.t - b.t);
	const rows: Sample[] = [];
	for (const s of sorted) if (!rows.length || s.t > rows[rows.length - 1].t) rows.push(s);
	const n = rows.length;
	const t = new Float64Array(n);
	const x = new Float64Array(n);
	const i = new Float64Array(n);
	let lastI = NaN;
	const firstI = rows.find((r) => typeof r.currentMilliAmp === 'number' && r.currentMilliAmp > 0)?.currentMilliAmp ?? NaN;
	for (let k = 0; k < n; k++) {
		t[k] = rows[k].t;
		x[k] = rows[k].kelvin;
		const c = rows[k].currentMilliAmp;
		lastI = typeof c === 'number' && Number.isFinite(c) && c > 0 ? c : Number.isNaN(lastI) ? firstI : lastI;
		i[k] = lastI;
	}
	const switches: number[] = [];
	for (let k = 1; k < n; k++) if (!Number.isNaN(i[k]) && !sameCurrent(i[k], i[k - 1])) switches.push(k);

	const outlier = hampel(t, x, i, outlierSigma);
	const ok = new Uint8Array(n);
	let last = -1;
	for (let k = 0, p = 0; k < n; k++) {
		while (p < switches.length && switches[p] <= k) last = switches[p++];
		const since = last >= 0 ? t[k] - t[last] : Infinity;
		ok[k] = outlier[k] || since < settleS ? 0 : 1;
	}
	const dts = new Float64Array(Math.max(n - 1, 0));
	for (let k = 1; k < n; k++) dts[k - 1] = t[k] - t[k - 1];
	return { t, x, i, ok, outlier: outlier, switches, medianDtS: n > 1 ? median(dts) : NaN, noiseSigma: noiseOf(x, i) };
}

const HALF_WINDOW = 7;

/**
 * Hampel filter: a reading is an outlier when it stands further than outlierSigma robust standard
 * deviations from the running median of its neighbours at the same current. The scale is the run's
 * robust scale of those residuals: on a monotonic stretch the running median is the middle reading,
 * so steep but smooth parts of a run are not mistaken for spikes.
 */
function hampel(t: Float64Array, x: Float64Array, i: Float64Array, outlierSigma: number): Uint8Array {
	const n = x.length;
	const res = new Float64Array(n);
	const win: number[] = [];
	for (let k = 0; k < n; k++) {
		win.length = 0;
		for (let j = Math.max(0, k - HALF_WINDOW); j <= Math.min(n - 1, k + HALF_WINDOW); j++) {
			if (Number.isNaN(i[k]) || Number.isNaN(i[j]) || i[j] === i[k] || Math.abs(i[j] - i[k]) < 1e-9) win.push(x[j]);
		}
		res[k] = x[k] - median(win);
	}
	const scale = Math.max(robustSigma(res), 1e-8);
	const out = new Uint8Array(n);
	for (let k = 0; k < n; k++) if (Math.abs(res[k]) > outlierSigma * scale) out[k] = 1;
	void t;
	return out;
}

/** Robust reading-to-reading noise: first differences / √2 (common practice for a quick σ). */
function noiseOf(x: Float64Array, i: Float64Array): number {
	const d: number[] = [];
	for (let k = 1; k < x.length; k++) if (i[k] === i[k - 1] || Number.isNaN(i[k])) d.push(x[k] - x[k - 1]);
	return d.length ? robustSigma(d) / Math.SQRT2 : NaN;
}
