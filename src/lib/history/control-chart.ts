// Control chart of one quantity over time (e.g. a cell's realized value, mK from the assigned value):
// the mean, the sample standard deviation, warning limits at ±2σ and action limits at ±3σ, and each point
// marked 'in', 'warning' (beyond 2σ) or 'action' (beyond 3σ). Pure; shared by pages and reports.

export interface ControlPoint {
	id: number;
	/** UTC ms */
	x: number;
	/** the value, in the chart's unit */
	y: number;
	/** standard uncertainty of the value, same unit (optional, for error bars) */
	u?: number | null;
}

export type ControlFlag = 'in' | 'warning' | 'action';

export interface ControlChart {
	n: number;
	mean: number | null;
	/** sample standard deviation (n − 1), null below two points */
	sigma: number | null;
	warning: { lower: number; upper: number } | null;
	action: { lower: number; upper: number } | null;
	points: (ControlPoint & { flag: ControlFlag; sigmas: number | null })[];
}

/**
 * Limits from all the points (common practice for a laboratory's own history: the spread of past
 * realizations is the control). σ is the sample standard deviation, so at least two points are needed;
 * with fewer the chart shows the points with no limits.
 */
export function controlChart(points: ControlPoint[]): ControlChart {
	const pts = points.filter((p) => Number.isFinite(p.y)).sort((a, b) => a.x - b.x);
	const n = pts.length;
	if (n === 0) return { n, mean: null, sigma: null, warning: null, action: null, points: [] };
	const mean = pts.reduce((s, p) => s + p.y, 0) / n;
	if (n < 2) return { n, mean, sigma: null, warning: null, action: null, points: pts.map((p) => ({ ...p, flag: 'in' as const, sigmas: null })) };
	// two-pass variance: the mean first, then the squared deviations (no cancellation)
	const sigma = Math.sqrt(pts.reduce((s, p) => s + (p.y - mean) ** 2, 0) / (n - 1));
	const flagOf = (y: number): ControlFlag => {
		const d = Math.abs(y - mean);
		return d > 3 * sigma ? 'action' : d > 2 * sigma ? 'warning' : 'in';
	};
	return {
		n,
		mean,
		sigma,
		warning: { lower: mean - 2 * sigma, upper: mean + 2 * sigma },
		action: { lower: mean - 3 * sigma, upper: mean + 3 * sigma },
		points: pts.map((p) => ({ ...p, flag: flagOf(p.y), sigmas: sigma > 0 ? (p.y - mean) / sigma : null }))
	};
}

/**
 * Difference of two realizations measured with the same thermometer, a − b, with its standard
 * uncertainty. The two runs' budgets (repeatability, slope, self-heating, head, pressure, impurity) are
 * taken as uncorrelated: separate cells, fills and days. What the two share, the thermometer's calibration
 * and its R_TPW at that temperature, is fully correlated and cancels in the difference; it is not in the
 * run budgets, so nothing is subtracted for it.
 */
export function difference(a: { value: number; u: number }, b: { value: number; u: number }, k = 2): { value: number; u: number; expanded: number; agree: boolean } {
	const value = a.value - b.value;
	const u = Math.sqrt(a.u ** 2 + b.u ** 2);
	return { value, u, expanded: k * u, agree: Math.abs(value) <= k * u };
}
