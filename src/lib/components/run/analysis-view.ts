// The finished run's analysis, put in the shape its tables and charts show. Pure TypeScript.
import type { RunAnalysis } from '$lib/plateau/index';
import type { Budget, Distribution } from '$lib/metrology/index';

/** The analysis endpoint's answer (the server's StoredRunAnalysis extends it with its cache key). */
export interface StoredAnalysisView {
	runId: number;
	basis: 'calibrated' | 'uncalibrated' | 'unavailable';
	subrange: string | null;
	/** UTC ms of the first reading: `t` in the analysis is seconds after it */
	t0Ms: number | null;
	readingCount: number;
	analysis: RunAnalysis | null;
	/** the thermometer's own W at the realized point (plateau at zero current, head and pressure removed) */
	wAtPoint: number | null;
	problem: string | null;
}

const DEFAULT_DIVISOR: Record<Distribution, number> = { normal: 1, rectangular: Math.sqrt(3), triangular: Math.sqrt(6), 'u-shaped': Math.SQRT2 };

export interface BudgetRow {
	name: string;
	source: string;
	value: number;
	unit: string;
	distribution: Distribution;
	divisor: number;
	sensitivity: number;
	standardUncertainty: number;
	contribution: number;
	/** share of the combined variance, 0..1 */
	share: number;
}

export function budgetRows(b: Budget & { sources?: { name: string; source: string }[] }): BudgetRow[] {
	const total = b.combinedStandardUncertainty ** 2;
	return b.components.map((c) => ({
		name: c.name,
		source: b.sources?.find((s) => s.name === c.name)?.source ?? '',
		value: c.value,
		unit: c.unit,
		distribution: c.distribution,
		divisor: c.divisor ?? c.coverageFactor ?? DEFAULT_DIVISOR[c.distribution],
		sensitivity: c.sensitivity ?? 1,
		standardUncertainty: c.standardUncertainty,
		contribution: c.contribution,
		share: total > 0 ? c.contribution ** 2 / total : 0
	}));
}

/** The 1/F plot: T (mK from the Raoult intercept) against 1/F, with the fitted line over its window. */
export function inverseFractionPlot(a: RunAnalysis): { points: { x: number; y: number }[]; fit: { x: number; y: number }[]; fitWindow: string | null } {
	const fit = a.inverseFractionFit;
	const ref = fit?.pureKelvin ?? a.plateau?.meanKelvin ?? 0;
	const points = a.fractionCurve
		.filter((p) => Number.isFinite(p.inverseLiquidFraction) && p.inverseLiquidFraction <= 20)
		.map((p) => ({ x: p.inverseLiquidFraction, y: (p.kelvin - ref) * 1000 }))
		.sort((p, q) => p.x - q.x);
	if (!fit || points.length === 0) return { points, fit: [], fitWindow: null };
	// the line only over the fraction window it was fitted in
	const inWindow = a.fractionCurve.filter((p) => p.fraction >= fit.fractionFrom && p.fraction <= fit.fractionTo && Number.isFinite(p.inverseLiquidFraction));
	const xs = (inWindow.length ? inWindow : a.fractionCurve).map((p) => p.inverseLiquidFraction).filter(Number.isFinite);
	const lo = Math.min(...xs);
	const hi = Math.max(...xs);
	return {
		points,
		fit: [
			{ x: lo, y: fit.slopeMilliKelvin * lo },
			{ x: hi, y: fit.slopeMilliKelvin * hi }
		],
		fitWindow: `${Math.round(fit.fractionFrom * 100)}–${Math.round(fit.fractionTo * 100)} %`
	};
}

/** Relative run time (s after the first reading) to UTC ms. */
export function atMs(t0Ms: number | null, s: number): number | null {
	return t0Ms === null ? null : Math.round(t0Ms + s * 1000);
}

export function molFractionText(x: number | null | undefined): string {
	if (x == null || !Number.isFinite(x)) return '—';
	return `${(x * 1e6).toFixed(3)} µmol/mol`;
}

export function degreesOfFreedomText(v: number): string {
	if (!Number.isFinite(v) || v > 1000) return '> 1000';
	return v.toFixed(0);
}
