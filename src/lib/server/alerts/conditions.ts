// The arithmetic of the alert rules, with no I/O: a rolling straight-line fit for the plateau slope,
// a rolling mean, a "sustained with hysteresis" switch and the R_TPW shift in millikelvin. Each is O(1)
// per reading (amortised), so the engine can run them on the ingest's update path.

import { referenceRatioDerivative } from '../../metrology/index';

/** Least-squares line through (t s, x mK) over the last `windowS` seconds; slope reported in mK/h. */
export class SlopeWindow {
	private ts: number[] = [];
	private xs: number[] = [];
	private head = 0;
	// Sums about a fixed origin (the first time seen) so that large epoch seconds do not cancel.
	private origin: number | null = null;
	private n = 0;
	private st = 0;
	private sx = 0;
	private stt = 0;
	private stx = 0;
	private sxx = 0;

	constructor(readonly windowS: number) {}

	get size(): number {
		return this.n;
	}

	/** Seconds covered by the points held. */
	get spanS(): number {
		return this.n < 2 ? 0 : this.ts[this.ts.length - 1] - this.ts[this.head];
	}

	push(tS: number, x: number): void {
		if (this.origin === null) this.origin = tS;
		const t = tS - this.origin;
		this.ts.push(tS);
		this.xs.push(x);
		this.add(t, x, 1);
		const left = tS - this.windowS;
		while (this.head < this.ts.length && this.ts[this.head] < left) {
			this.add(this.ts[this.head] - this.origin, this.xs[this.head], -1);
			this.head++;
		}
		// Compact now and then; re-summing also clears the rounding that add/subtract accumulates.
		if (this.head > 4096 && this.head * 2 > this.ts.length) this.rebase();
	}

	reset(): void {
		this.ts = [];
		this.xs = [];
		this.head = 0;
		this.origin = null;
		this.n = this.st = this.sx = this.stt = this.stx = this.sxx = 0;
	}

	/** Slope and its standard uncertainty (white-noise residuals), mK/h; null below 3 points. */
	fit(): { slopeMilliKelvinPerHour: number; stdErrMilliKelvinPerHour: number } | null {
		const n = this.n;
		if (n < 3) return null;
		const tm = this.st / n;
		const xm = this.sx / n;
		const stt = this.stt - n * tm * tm;
		const stx = this.stx - n * tm * xm;
		const sxx = this.sxx - n * xm * xm;
		if (!(stt > 0)) return null;
		const b = stx / stt;
		const residual = Math.max(0, sxx - b * stx) / (n - 2);
		const u = Math.sqrt(residual / stt);
		return { slopeMilliKelvinPerHour: b * 3600, stdErrMilliKelvinPerHour: u * 3600 };
	}

	private add(t: number, x: number, sign: 1 | -1): void {
		this.n += sign;
		this.st += sign * t;
		this.sx += sign * x;
		this.stt += sign * t * t;
		this.stx += sign * t * x;
		this.sxx += sign * x * x;
	}

	private rebase(): void {
		const ts = this.ts.slice(this.head);
		const xs = this.xs.slice(this.head);
		this.reset();
		for (let i = 0; i < ts.length; i++) {
			if (this.origin === null) this.origin = ts[i];
			this.ts.push(ts[i]);
			this.xs.push(xs[i]);
			this.add(ts[i] - this.origin, xs[i], 1);
		}
	}
}

/** Mean of x over the last `windowS` seconds. */
export class RollingMean {
	private ts: number[] = [];
	private xs: number[] = [];
	private head = 0;
	private sum = 0;

	constructor(readonly windowS: number) {}

	push(tS: number, x: number): void {
		this.ts.push(tS);
		this.xs.push(x);
		this.sum += x;
		while (this.head < this.ts.length && this.ts[this.head] < tS - this.windowS) this.sum -= this.xs[this.head++];
		if (this.head > 4096 && this.head * 2 > this.ts.length) {
			this.ts = this.ts.slice(this.head);
			this.xs = this.xs.slice(this.head);
			this.head = 0;
			this.sum = this.xs.reduce((a, b) => a + b, 0);
		}
	}

	get count(): number {
		return this.ts.length - this.head;
	}

	mean(): number | null {
		return this.count > 0 ? this.sum / this.count : null;
	}

	reset(): void {
		this.ts = [];
		this.xs = [];
		this.head = 0;
		this.sum = 0;
	}
}

/**
 * A switch with hysteresis in time and level: it turns on once `above` has held for `sustainS`
 * without a break, and off once `belowClear` has held for `clearS`. Between the two levels it keeps
 * its state, so a value hovering at the limit does not make it chatter.
 */
export class Sustained {
	on = false;
	private since: number | null = null;
	private clearSince: number | null = null;

	constructor(
		public sustainS: number,
		public clearS: number
	) {}

	/** Returns the state after this observation at time tS. */
	update(tS: number, above: boolean, belowClear: boolean): boolean {
		if (!this.on) {
			if (above) {
				this.since ??= tS;
				if (tS - this.since >= this.sustainS) {
					this.on = true;
					this.clearSince = null;
				}
			} else this.since = null;
		} else if (belowClear) {
			this.clearSince ??= tS;
			if (tS - this.clearSince >= this.clearS) {
				this.on = false;
				this.since = null;
			}
		} else this.clearSince = null;
		return this.on;
	}

	reset(): void {
		this.on = false;
		this.since = null;
		this.clearSince = null;
	}
}

/**
 * How far a slope is beyond its limit once its uncertainty is allowed for: |s| − k·u − limit. Positive
 * means the slope is beyond the limit even at the favourable end of its k·u interval, so noise alone
 * (which inflates u) does not make it positive.
 */
export function driftExcess(slopeMilliKelvinPerHour: number, stdErrMilliKelvinPerHour: number, k: number, limitMilliKelvinPerHour: number): number {
	return Math.abs(slopeMilliKelvinPerHour) - k * stdErrMilliKelvinPerHour - limitMilliKelvinPerHour;
}

/** dW_r/dT at the triple point of water, per kelvin (≈ 3.98853e-3 /K). */
export const DW_DT_AT_TPW_PER_K = referenceRatioDerivative(273.16);

/**
 * A change of R_TPW expressed as the temperature change it would mimic at the triple point of water:
 * dT = dR / (R_TPW · dW_r/dT), in mK (positive when R_TPW rose).
 */
export function rtpwShiftMilliKelvin(beforeOhm: number, afterOhm: number): number {
	return ((afterOhm - beforeOhm) / (beforeOhm * DW_DT_AT_TPW_PER_K)) * 1000;
}

/** What a condition that has come on does to the alert with its key (the lifecycle's de-duplication). */
export type OnsetAction = { do: 'create' } | { do: 'touch'; id: number } | { do: 'reopen'; id: number };

export function onsetAction(latest: { id: number; state: string; resolvedAtMs: number | null } | null, nowMs: number, holdOffMs: number): OnsetAction {
	if (!latest) return { do: 'create' };
	if (latest.state !== 'cleared') return { do: 'touch', id: latest.id };
	if (latest.resolvedAtMs !== null && nowMs - latest.resolvedAtMs <= holdOffMs) return { do: 'reopen', id: latest.id };
	return { do: 'create' };
}

/** Retry delay of the e-mail outbox after `attempts` failures: 5 s doubling, capped at 10 min. */
export function retryDelayMs(attempts: number): number {
	return Math.min(600_000, 5000 * 2 ** Math.max(0, attempts - 1));
}
export const MAX_DELIVERY_ATTEMPTS = 8;
