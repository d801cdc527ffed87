import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createPlateauTracker, restorePlateauTracker } from './tracker';
import { gaussian, mulberry32, syntheticRun, type SyntheticRun } from './synthetic';
import type { TrackerSnapshot, TrackerState } from './types';

function run(spec: SyntheticRun, options: Partial<Parameters<typeof createPlateauTracker>[0]> = {}) {
	const { samples, truth } = syntheticRun(spec);
	const tr = createPlateauTracker({ kind: spec.kind, ...options });
	const states: { t: number; state: TrackerState }[] = [];
	const snaps: TrackerSnapshot[] = [];
	for (const s of samples) {
		const snap = tr.push(s.t, s.kelvin, s.currentMilliAmp);
		snaps.push(snap);
		if (!states.length || states[states.length - 1].state !== snap.state) states.push({ t: s.t, state: snap.state });
	}
	return { tr, truth, states, snaps, samples };
}

const sequence = (states: { state: TrackerState }[]) => states.map((s) => s.state);

function allPlain(v: unknown): boolean {
	if (v === null || typeof v === 'string' || typeof v === 'boolean') return true;
	if (typeof v === 'number') return Number.isFinite(v);
	if (Array.isArray(v)) return v.every(allPlain);
	if (typeof v === 'object') return Object.values(v as object).every(allPlain);
	return false;
}

describe('state transitions', () => {
	it('melt: waiting → approach → plateau → ending → ended, with start and end dated back', () => {
		const { states, tr, truth } = run({ kind: 'melt', slopeMilliKelvinPerHour: 0.5 });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'plateau', 'ending', 'ended']);
		const s = tr.snapshot();
		expect(Math.abs(s.plateauStart! - truth.start)).toBeLessThan(120);
		expect(Math.abs(s.plateauEnd! - truth.end)).toBeLessThan(120);
		expect(s.onPlateau).toBe(false);
		expect(s.fraction).toBe(1);
	});

	it('freeze with a known point: approach → undercool → rebound → plateau → ending → ended', () => {
		const { states } = run({ kind: 'freeze', undercoolKelvin: 0.5 }, { expectedKelvin: 429.7485 });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'undercool', 'rebound', 'plateau', 'ending', 'ended']);
	});

	it('freeze without a known point still shows the rebound', () => {
		const { states } = run({ kind: 'freeze', undercoolKelvin: 0.5 });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'rebound', 'plateau', 'ending', 'ended']);
	});

	it('triple point: a settled cell reaches the plateau and a departure either way ends it', () => {
		const { states } = run({ kind: 'triple-point', plateauKelvin: 273.16, approachKelvinPerHour: 3 });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'plateau', 'ending', 'ended']);
	});

	it('a false alarm returns from ending to plateau', () => {
		// a 1 mK bump, 10 min up and 10 min down: turning for a while, but never a departure
		const { samples } = syntheticRun({ kind: 'melt', tailS: 0 });
		const tr = createPlateauTracker({ kind: 'melt', flatSlopeMilliKelvinPerHour: 5 });
		const seen: TrackerState[] = [];
		for (const s of samples) {
			const bump = s.t > 20000 && s.t < 20600 ? ((s.t - 20000) / 600) * 1e-3 : s.t >= 20600 && s.t < 21200 ? ((21200 - s.t) / 600) * 1e-3 : 0;
			const st = tr.push(s.t, s.kelvin + bump).state;
			if (seen[seen.length - 1] !== st) seen.push(st);
		}
		expect(seen).toEqual(['waiting', 'approach', 'plateau', 'ending', 'plateau']);
	});
});

describe('robustness', () => {
	it('outliers neither end the plateau nor move its value', () => {
		const clean = run({ kind: 'freeze', seed: 5 });
		const spiky = run({ kind: 'freeze', seed: 5, outlierProbability: 0.02, outlierKelvin: 2e-3 });
		expect(sequence(spiky.states)).toEqual(sequence(clean.states));
		const i = spiky.snaps.findIndex((s) => s.t! >= 20000);
		expect(spiky.snaps[i].outliers).toBeGreaterThan(30);
		expect(Math.abs(spiky.snaps[i].valueKelvin! - clean.snaps[i].valueKelvin!)).toBeLessThan(10e-6);
	});

	it('a 20-minute gap on the plateau is counted and does not end it', () => {
		const { states, snaps } = run({ kind: 'melt', gaps: [[15000, 16200]] });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'plateau', 'ending', 'ended']);
		expect(snaps[snaps.length - 1].gaps).toBe(1);
	});

	it('current switching 1 ↔ 1.414 mA is self-heating, not a plateau end; the step gives the self-heating', () => {
		const currents: [number, number][] = [[0, 1]];
		for (let t = 7200; t < 30000; t += 5400) currents.push([t, 1.414], [t + 360, 1]);
		const { states, snaps, tr } = run({ kind: 'freeze', selfHeatingKelvinAt1mA: 1e-3, currents, rho: 0.5 });
		expect(sequence(states)).toEqual(['waiting', 'approach', 'rebound', 'plateau', 'ending', 'ended']);
		const s = tr.snapshot();
		expect(s.selfHeatingMilliKelvin!).toBeGreaterThan(0.95);
		expect(s.selfHeatingMilliKelvin!).toBeLessThan(1.05);
		// readings at 1.414 mA are brought back to the reference current: the value does not jump
		const on = snaps.filter((x) => x.onPlateau && x.t! > 8000 && x.t! < 30000);
		const values = on.map((x) => x.valueKelvin!);
		expect(Math.max(...values) - Math.min(...values)).toBeLessThan(0.1e-3);
		expect(s.zeroCurrentKelvin! - s.valueKelvin!).toBeCloseTo(-s.selfHeatingMilliKelvin! / 1000, 9);
	});

	it('furnace ramps of 50 mK/h and faster are never a plateau (property over rate, sign, noise)', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 50, max: 5000, noNaN: true }),
				fc.constantFrom(1, -1),
				fc.double({ min: 0, max: 200e-6, noNaN: true }),
				fc.double({ min: 0, max: 0.9, noNaN: true }),
				fc.integer({ min: 1, max: 1e6 }),
				fc.constantFrom('melt', 'freeze', 'triple-point'),
				(rate, sign, noise, rho, seed, kind) => {
					const tr = createPlateauTracker({ kind: kind as 'melt' });
					const rand = mulberry32(seed);
					let e = 0;
					for (let t = 0; t < 6 * 3600; t += 10) {
						e = rho * e + Math.sqrt(1 - rho * rho) * gaussian(rand);
						const snap = tr.push(t, 500 + (sign * rate * t) / 3.6e6 + noise * e, t % 3600 < 360 ? 1.414 : 1);
						if (snap.onPlateau) return false;
					}
					return true;
				}
			),
			{ numRuns: 40 }
		);
	});

	it('AR(1) noise: the live slope uncertainty covers the scatter of live slope estimates (ratio 0.6–1.6)', () => {
		const slopes: number[] = [];
		const us: number[] = [];
		for (let seed = 1; seed <= 60; seed++) {
			const { snaps } = run({ kind: 'melt', seed, rho: 0.9, noiseKelvin: 50e-6, slopeMilliKelvinPerHour: 0.3, durationS: 4 * 3600, tailS: 0 });
			const s = snaps[snaps.length - 1];
			expect(s.onPlateau).toBe(true);
			slopes.push(s.slopeMilliKelvinPerHour!);
			us.push(s.slopeStdErrMilliKelvinPerHour!);
		}
		const m = slopes.reduce((a, b) => a + b, 0) / slopes.length;
		const sd = Math.sqrt(slopes.reduce((a, b) => a + (b - m) ** 2, 0) / (slopes.length - 1));
		const ratio = sd / (us.reduce((a, b) => a + b, 0) / us.length);
		expect(ratio).toBeGreaterThan(0.6);
		expect(ratio).toBeLessThan(1.6);
		expect(Math.abs(m - 0.3)).toBeLessThan(3 * sd / Math.sqrt(slopes.length) + 0.02);
	});
});

describe('plateau figures', () => {
	it('reports value, slope, noise, elapsed; fraction and remaining from an expected duration', () => {
		const { snaps } = run({ kind: 'melt', slopeMilliKelvinPerHour: 1, noiseKelvin: 40e-6 }, { expectedDurationS: 8 * 3600 });
		const mid = snaps.find((s) => s.t === 3600 + 4 * 3600)!;
		expect(mid.state).toBe('plateau');
		expect(mid.valueKelvin!).toBeCloseTo(429.7485 + 4e-3, 4);
		expect(mid.slopeMilliKelvinPerHour!).toBeGreaterThan(0.5);
		expect(mid.slopeMilliKelvinPerHour!).toBeLessThan(1.5);
		expect(mid.noiseMilliKelvin!).toBeGreaterThan(0.03);
		expect(mid.noiseMilliKelvin!).toBeLessThan(0.05);
		expect(mid.plateauElapsedS!).toBeCloseTo(4 * 3600, -2);
		expect(mid.fraction!).toBeCloseTo(0.5, 1);
		expect(mid.remainingS!).toBeCloseTo(4 * 3600, -2);
		expect(mid.remainingSource).toBe('expected-duration');
	});

	it('freeze with Raoult roll-off: time remaining from the slope growth', () => {
		const { snaps, truth } = run({ kind: 'freeze', raoultKelvin: 0.5e-3, noiseKelvin: 10e-6, durationS: 10 * 3600 });
		const late = snaps.find((s) => s.t === truth.start + 0.8 * 10 * 3600)!;
		expect(late.remainingSource).toBe('raoult-curvature');
		// the true remaining time is 2 h; the local quadratic is a rough guide
		expect(late.remainingS!).toBeGreaterThan(0.5 * 7200);
		expect(late.remainingS!).toBeLessThan(2 * 7200);
	});
});

describe('memory, JSON and restore', () => {
	it('internal buffer sizes stay constant after 10^5 pushes', () => {
		const tr = createPlateauTracker({ kind: 'triple-point' });
		const rand = mulberry32(9);
		for (let k = 0; k < 1000; k++) tr.push(k * 2, 273.16 + 3e-5 * gaussian(rand), k % 900 < 180 ? 1.414 : 1);
		const early = tr.bufferSizes();
		for (let k = 1000; k < 100_000; k++) tr.push(k * 2, 273.16 + 3e-5 * gaussian(rand), k % 900 < 180 ? 1.414 : 1);
		const late = tr.bufferSizes();
		for (const key of Object.keys(early)) if (!key.endsWith('Used') && key !== 'suspects') expect(late[key]).toBe(early[key]);
		expect(late.slopeUsed).toBeLessThanOrEqual(late.slope);
		expect(late.suspects).toBeLessThanOrEqual(3);
	});

	it('snapshots are plain JSON: only finite numbers, strings, booleans and null, whatever is pushed', () => {
		fc.assert(
			fc.property(
				fc.array(
					fc.record({
						dt: fc.oneof(fc.double({ min: -5, max: 2000 }), fc.constant(Number.NaN)),
						k: fc.oneof(fc.double({ min: 80, max: 1300 }), fc.constantFrom(Number.NaN, Infinity, -Infinity, 0)),
						i: fc.option(fc.oneof(fc.constantFrom(1, 1.414, 0, -1, Number.NaN)), { nil: undefined })
					}),
					{ maxLength: 400 }
				),
				(rows) => {
					const tr = createPlateauTracker({ kind: 'freeze' });
					let t = 0;
					for (const r of rows) {
						t += r.dt;
						const snap = tr.push(t, r.k, r.i);
						if (!allPlain(snap)) return false;
					}
					return allPlain(JSON.parse(JSON.stringify(tr.snapshot())));
				}
			),
			{ numRuns: 100 }
		);
	});

	it('toJSON / restore gives a tracker in the same state', () => {
		const { samples } = syntheticRun({ kind: 'melt', durationS: 3 * 3600 });
		const tr = createPlateauTracker({ kind: 'melt', capacity: 8192 });
		const half = samples.filter((s) => s.t < 3600 + 2 * 3600);
		for (const s of half) tr.push(s.t, s.kelvin, s.currentMilliAmp);
		const copy = restorePlateauTracker(JSON.parse(JSON.stringify(tr.toJSON())));
		expect(copy.snapshot().state).toBe(tr.snapshot().state);
		expect(copy.snapshot().valueKelvin!).toBeCloseTo(tr.snapshot().valueKelvin!, 9);
		for (const s of samples.slice(half.length)) {
			tr.push(s.t, s.kelvin);
			copy.push(s.t, s.kelvin);
		}
		expect(copy.snapshot().state).toBe('ended');
		expect(copy.snapshot().plateauEnd).toBe(tr.snapshot().plateauEnd);
	});
});
