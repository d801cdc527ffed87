// The run chart's data: the columnar shape the curve endpoint serves (GET /runs/{id}/curve) and the
// pure helpers that merge an overview, a finer slice for the visible range and live readings. No Svelte.

/** What the curve endpoint did with the readings of the range. */
export type CurveDetail = 'raw' | 'minmax' | 'sampled';

/** Readings of one time range, columnar. Null where the reduction was not possible. */
export interface CurveData {
	runId: number;
	detail: CurveDetail;
	/** the range asked for (UTC ms); null = the run's own first / last reading */
	fromMs: number | null;
	toMs: number | null;
	/** the newest seq the data covers (live readings follow from throughSeq + 1) */
	throughSeq: number;
	/** readings in the range */
	readings: number;
	/** UTC ms */
	t: number[];
	/** T90 − expected sensor temperature (assigned value + head and pressure corrections), mK */
	d: (number | null)[];
	w: (number | null)[];
	/** T90, K */
	k: (number | null)[];
	/** bridge ratio as received */
	r: number[];
	/** current, mA */
	i: number[];
}

export interface SeriesPoint {
	x: number;
	y: number;
}

/** The quantities the second panel can show. */
export type SecondQuantity = 'w' | 't90' | 'ratio' | 'selfHeating';

export const SECOND_QUANTITIES: Record<SecondQuantity, { label: string; title: string; digits: number; unit: string }> = {
	w: { label: 'W', title: 'W = R/R_TPW (1)', digits: 8, unit: '' },
	t90: { label: 'T90 (K)', title: 'T90 (K)', digits: 5, unit: 'K' },
	ratio: { label: 'Bridge ratio', title: 'Bridge ratio R_x/R_s (1)', digits: 8, unit: '' },
	selfHeating: { label: 'Self-heating (mK)', title: 'Self-heating at the lower current (mK)', digits: 3, unit: 'mK' }
};

/** A reading in the chart's terms (from the curve endpoint or the live stream). */
export interface ChartReading {
	timeMs: number;
	deltaMilliKelvin: number | null;
	w: number | null;
	t90Kelvin: number | null;
	ratio: number;
	currentMilliAmp: number;
}

export function curveReadings(c: CurveData): ChartReading[] {
	const out: ChartReading[] = new Array(c.t.length);
	for (let j = 0; j < c.t.length; j++) out[j] = { timeMs: c.t[j], deltaMilliKelvin: c.d[j], w: c.w[j], t90Kelvin: c.k[j], ratio: c.r[j], currentMilliAmp: c.i[j] };
	return out;
}

/**
 * The overview with the slice [fromMs, toMs] replaced by finer readings, sorted by time
 * (the chart's decimation needs sorted x).
 */
export function spliceDetail(overview: ChartReading[], detail: ChartReading[], fromMs: number, toMs: number): ChartReading[] {
	const before = overview.filter((p) => p.timeMs < fromMs);
	const after = overview.filter((p) => p.timeMs > toMs);
	return [...before, ...detail.filter((p) => p.timeMs >= fromMs && p.timeMs <= toMs), ...after];
}

/** Appends readings newer than the last one held (live readings may overlap what a fetch returned). */
export function appendNewer(target: ChartReading[], incoming: ChartReading[]): number {
	let last = target.length ? target[target.length - 1].timeMs : -Infinity;
	let added = 0;
	for (const r of incoming) {
		if (r.timeMs <= last) continue;
		target.push(r);
		last = r.timeMs;
		added++;
	}
	return added;
}

export function pointOf(r: ChartReading, q: 'delta' | SecondQuantity): SeriesPoint | null {
	const y = q === 'delta' ? r.deltaMilliKelvin : q === 'w' ? r.w : q === 't90' ? r.t90Kelvin : q === 'ratio' ? r.ratio : null;
	return y === null || !Number.isFinite(y) ? null : { x: r.timeMs, y };
}

export function toPoints(rs: readonly ChartReading[], q: 'delta' | SecondQuantity): SeriesPoint[] {
	const out: SeriesPoint[] = [];
	for (const r of rs) {
		const p = pointOf(r, q);
		if (p) out.push(p);
	}
	return out;
}

export interface TimeBand {
	fromMs: number;
	toMs: number;
	currentMilliAmp: number;
}

/**
 * Stretches of readings at a raised current (self-heating checks, e.g. 1.414 mA against 1 mA):
 * the lowest current seen is the base; anything 5 % above it is raised.
 */
export function raisedCurrentBands(rs: readonly ChartReading[]): TimeBand[] {
	if (rs.length === 0) return [];
	let base = Infinity;
	for (const r of rs) if (r.currentMilliAmp > 0 && r.currentMilliAmp < base) base = r.currentMilliAmp;
	if (!Number.isFinite(base)) return [];
	const bands: TimeBand[] = [];
	let open: TimeBand | null = null;
	for (const r of rs) {
		const raised = r.currentMilliAmp > base * 1.05;
		if (raised) {
			if (open && Math.abs(open.currentMilliAmp - r.currentMilliAmp) < 1e-9) open.toMs = r.timeMs;
			else {
				if (open) bands.push(open);
				open = { fromMs: r.timeMs, toMs: r.timeMs, currentMilliAmp: r.currentMilliAmp };
			}
		} else if (open) {
			open.toMs = r.timeMs;
			bands.push(open);
			open = null;
		}
	}
	if (open) bands.push(open);
	return bands;
}

/** The slope-fit line over its window: y = value + slope × (t − tEnd), in mK against UTC ms. */
export function slopeLine(startMs: number, endMs: number, valueAtEndMilliKelvin: number, slopeMilliKelvinPerHour: number): SeriesPoint[] {
	if (!(endMs > startMs)) return [];
	return [
		{ x: startMs, y: valueAtEndMilliKelvin - (slopeMilliKelvinPerHour * (endMs - startMs)) / 3_600_000 },
		{ x: endMs, y: valueAtEndMilliKelvin }
	];
}
