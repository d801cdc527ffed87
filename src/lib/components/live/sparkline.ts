// A tile's small live trace: a bounded buffer of (time, value) and the SVG path that draws it.

export interface SparkPoint {
	t: number;
	v: number;
}

export class SparkBuffer {
	points: SparkPoint[] = [];
	constructor(readonly capacity = 240) {}
	push(t: number, v: number | null): void {
		if (v === null || !Number.isFinite(v)) return;
		const last = this.points[this.points.length - 1];
		if (last && t <= last.t) return;
		this.points.push({ t, v });
		// Bounded: when full, keep every other point of the older half, so the trace keeps its span.
		if (this.points.length > this.capacity) {
			const half = Math.floor(this.points.length / 2);
			this.points = [...this.points.slice(0, half).filter((_, i) => i % 2 === 0), ...this.points.slice(half)];
		}
	}
}

/** Path in a width × height box (y grows downwards), with the value range it spans. */
export function sparkPath(points: readonly SparkPoint[], width: number, height: number, pad = 2): { d: string; min: number; max: number } | null {
	if (points.length < 2) return null;
	const t0 = points[0].t;
	const t1 = points[points.length - 1].t;
	let min = Infinity;
	let max = -Infinity;
	for (const p of points) (min = Math.min(min, p.v)), (max = Math.max(max, p.v));
	// at least 0.01 mK of range, so noise on a flat plateau does not fill the box
	const span = Math.max(max - min, 0.01);
	const mid = (max + min) / 2;
	const lo = mid - span / 2;
	const x = (t: number) => pad + ((t - t0) / Math.max(t1 - t0, 1)) * (width - 2 * pad);
	const y = (v: number) => height - pad - ((v - lo) / span) * (height - 2 * pad);
	const d = points.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(p.t).toFixed(1)},${y(p.v).toFixed(1)}`).join(' ');
	return { d, min, max };
}
