// The chart wrapper's props: series of {x, y} points (x in UTC ms on a time axis), theme tones, axes.

export type Tone = 'steady' | 'caution' | 'fault' | 'signal' | 'muted' | 'ink';

export interface ChartPoint {
	x: number;
	y: number;
}

export interface ChartSeries {
	label: string;
	/** Sorted by x (the decimation plugin needs it). */
	points: ChartPoint[];
	tone: Tone;
	/** 'line' (no markers, the default), 'points' (markers only) or 'both'. */
	style?: 'line' | 'points' | 'both';
	dash?: number[];
	width?: number;
	pointRadius?: number;
	/** Per-point tones (e.g. a flagged check); falls back to `tone`. */
	pointTones?: Tone[];
	/** Step instead of slope between points (a limit line). */
	stepped?: boolean;
}

export interface AxisSpec {
	kind: 'time' | 'linear';
	/** The axis title, with its unit: "Time (UTC)", "Deviation (mK)". */
	title: string;
	/** Unit appended to values in tooltips, e.g. 'mK'. */
	unit?: string;
	/** Decimal places of values in tooltips and ticks. */
	digits?: number;
	min?: number;
	max?: number;
}
