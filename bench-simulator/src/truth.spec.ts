import { describe, expect, it } from 'vitest';
import { simulate } from './index';

describe('noise-free trace beside the ground truth', () => {
	it('over the truth’s own window it gives the truth’s slope; over other windows the slope of the curve there', () => {
		const { truth, trace } = simulate('sn-freeze-impure', { epochMs: 0, highCurrentForMinutes: 0 }, 3);
		const w = truth.slopeWindow!;
		expect(w.basis).toBe('fraction 20-80 %');
		// no dropout: every tick is a reading, so this is the same least-squares slope
		expect(trace.slopeMilliKelvinPerHour(w.startMs, w.endMs)).toBeCloseTo(truth.trueSlopeMilliKelvinPerHour!, 9);
		// Raoult: a freeze falls ever faster as the liquid runs out (T = T_pure − c/F)
		const mid = (w.startMs + w.endMs) / 2;
		const early = trace.slopeMilliKelvinPerHour(w.startMs, mid)!;
		const late = trace.slopeMilliKelvinPerHour(mid, w.endMs)!;
		expect(early).toBeLessThan(0);
		expect(late).toBeLessThan(1.5 * early);
		expect(trace.slopeMilliKelvinPerHour(w.startMs, w.startMs + 1)).toBeNull();
	});

	it('leaves out the silent ticks of a dropout, which a detector never sees', () => {
		const { truth, trace } = simulate('zn-freeze-dropout', { epochMs: 0 }, 1);
		const d = truth.faults.dropouts[0];
		expect(d).toBeDefined();
		// a window that is half dropout: the slope comes from the readings either side only
		const a = trace.slopeMilliKelvinPerHour(d.startMs - (d.endMs - d.startMs), d.endMs + (d.endMs - d.startMs));
		expect(a).not.toBeNull();
		// inside the dropout there are no readings at all
		expect(trace.slopeMilliKelvinPerHour(d.startMs + 10_000, d.endMs - 10_000)).toBeNull();
	});

	it('the GroundTruth stays plain JSON (the CLI writes it to a file)', () => {
		const { truth } = simulate('quick-in-freeze', { epochMs: 0, durationHours: 0.2 }, 1);
		expect(JSON.parse(JSON.stringify(truth))).toEqual(truth);
	});
});
