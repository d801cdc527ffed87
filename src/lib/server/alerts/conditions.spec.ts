import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { driftExcess, onsetAction, retryDelayMs, RollingMean, rtpwShiftMilliKelvin, SlopeWindow, Sustained, DW_DT_AT_TPW_PER_K } from './conditions';

describe('SlopeWindow', () => {
	it('recovers a straight line’s slope in mK/h and keeps only the window', () => {
		const w = new SlopeWindow(600);
		// 1.8 mK/h = 0.0005 mK/s, on top of a large epoch so that the sums must not cancel
		for (let i = 0; i <= 1200; i++) w.push(1.76e9 + i, 3 + 0.0005 * i);
		const f = w.fit()!;
		expect(f.slopeMilliKelvinPerHour).toBeCloseTo(1.8, 9);
		expect(f.stdErrMilliKelvinPerHour).toBeLessThan(1e-6);
		expect(w.spanS).toBe(600);
		expect(w.size).toBe(601);
	});

	it('matches a batch least-squares fit over the window for any data (property)', () => {
		fc.assert(
			fc.property(fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 5, maxLength: 200 }), fc.integer({ min: 10, max: 100 }), (xs, windowS) => {
				const w = new SlopeWindow(windowS);
				xs.forEach((x, i) => w.push(i * 2, x));
				const kept = xs.map((x, i) => ({ t: i * 2, x })).filter((p) => p.t >= (xs.length - 1) * 2 - windowS);
				if (kept.length < 3) return;
				const n = kept.length;
				const tm = kept.reduce((s, p) => s + p.t, 0) / n;
				const xm = kept.reduce((s, p) => s + p.x, 0) / n;
				const b = kept.reduce((s, p) => s + (p.t - tm) * (p.x - xm), 0) / kept.reduce((s, p) => s + (p.t - tm) ** 2, 0);
				expect(w.fit()!.slopeMilliKelvinPerHour).toBeCloseTo(b * 3600, 5);
			})
		);
	});

	it('gives white noise a slope uncertainty that makes |s| − 2u rarely positive', () => {
		let seed = 7;
		const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
		let fired = 0;
		for (let trial = 0; trial < 200; trial++) {
			const w = new SlopeWindow(900);
			for (let i = 0; i < 180; i++) w.push(i * 5, 0.05 * rand());
			const f = w.fit()!;
			if (driftExcess(f.slopeMilliKelvinPerHour, f.stdErrMilliKelvinPerHour, 2, 0) > 0) fired++;
		}
		expect(fired).toBeLessThan(20); // about 5 % expected at k = 2 with a zero limit
	});
});

describe('driftExcess', () => {
	it('is |slope| − k·u − limit', () => {
		expect(driftExcess(-1.2, 0.1, 2, 0.5)).toBeCloseTo(0.5, 12);
		expect(driftExcess(0.6, 0.1, 2, 0.5)).toBeLessThan(0);
	});
});

describe('Sustained (hysteresis in time and level)', () => {
	it('turns on only after the condition held for the whole sustain time, off only after clear held', () => {
		const s = new Sustained(60, 30);
		expect(s.update(0, true, false)).toBe(false);
		expect(s.update(30, true, false)).toBe(false);
		expect(s.update(59, true, false)).toBe(false);
		expect(s.update(60, true, false)).toBe(true);
		// between the levels: stays on
		expect(s.update(70, false, false)).toBe(true);
		expect(s.update(80, false, true)).toBe(true);
		expect(s.update(100, false, false)).toBe(true); // clear interrupted
		expect(s.update(105, false, true)).toBe(true);
		expect(s.update(135, false, true)).toBe(false);
	});
	it('a break in the condition restarts the sustain time', () => {
		const s = new Sustained(60, 0);
		s.update(0, true, false);
		s.update(50, false, false);
		expect(s.update(100, true, false)).toBe(false);
		expect(s.update(160, true, false)).toBe(true);
	});
});

describe('RollingMean', () => {
	it('averages over the window only', () => {
		const m = new RollingMean(10);
		for (let t = 0; t <= 100; t++) m.push(t, t < 50 ? 0 : 10);
		expect(m.mean()).toBe(10);
		expect(m.count).toBe(11);
	});
});

describe('R_TPW shift in mK equivalent', () => {
	it('uses dW_r/dT at 273.16 K ≈ 3.98853e-3 /K (ITS-90 reference function)', () => {
		expect(DW_DT_AT_TPW_PER_K).toBeCloseTo(3.98853e-3, 6);
	});
	it('dT = dR / (R_TPW · dW_r/dT): +0.1 mΩ on 25.5 Ω is about +0.98 mK', () => {
		expect(rtpwShiftMilliKelvin(25.5, 25.5001)).toBeCloseTo(0.1e-3 / (25.5 * 3.98853e-3) * 1000, 6);
		expect(rtpwShiftMilliKelvin(25.5, 25.5001)).toBeCloseTo(0.983, 3);
		expect(rtpwShiftMilliKelvin(25.5001, 25.5)).toBeLessThan(0);
	});
});

describe('onsetAction (de-duplication)', () => {
	it('creates, touches an open alert, reopens within the hold-off, creates again after it', () => {
		expect(onsetAction(null, 1000, 60_000)).toEqual({ do: 'create' });
		expect(onsetAction({ id: 4, state: 'raised', resolvedAtMs: null }, 1000, 60_000)).toEqual({ do: 'touch', id: 4 });
		expect(onsetAction({ id: 4, state: 'noted', resolvedAtMs: null }, 1000, 60_000)).toEqual({ do: 'touch', id: 4 });
		expect(onsetAction({ id: 4, state: 'cleared', resolvedAtMs: 0 }, 60_000, 60_000)).toEqual({ do: 'reopen', id: 4 });
		expect(onsetAction({ id: 4, state: 'cleared', resolvedAtMs: 0 }, 60_001, 60_000)).toEqual({ do: 'create' });
	});
});

describe('retryDelayMs', () => {
	it('doubles from 5 s and stops at 10 min', () => {
		expect([1, 2, 3, 4].map(retryDelayMs)).toEqual([5000, 10_000, 20_000, 40_000]);
		expect(retryDelayMs(20)).toBe(600_000);
	});
});
