import { describe, expect, it } from 'vitest';
import { basisText, liveMarks } from './overlay-view';
import type { DetectorState } from '$lib/live/protocol';

const d = (over: Partial<DetectorState>): DetectorState => ({
	state: 'plateau', onPlateau: true, valueKelvin: 429.7485, slopeMilliKelvinPerHour: 0.2, slopeStdErrMilliKelvinPerHour: 0.05, noiseMilliKelvin: 0.02,
	plateauStartS: 1000, plateauElapsedS: 7200, fraction: 0.3, remainingS: 3600, selfHeatingMilliKelvin: 0.6, readings: 100, rebuilding: false, ...over
});

describe('run chart marks', () => {
	it('shades the tracker’s plateau and draws the slope over at most its window', () => {
		const m = liveMarks(d({}), 429.7495);
		expect(m.plateau).toMatchObject({ fromMs: 1_000_000, toMs: 8_200_000 });
		expect(m.slope!.startMs).toBe(8_200_000 - 3_600_000);
		expect(m.slope!.valueMilliKelvin).toBeCloseTo(-1, 6);
	});

	it('shades nothing before a plateau', () => {
		expect(liveMarks(d({ plateauStartS: null }), 429.7).plateau).toBeNull();
	});

	it('says when ΔW = 0 was used', () => {
		expect(basisText('uncalibrated', null).text).toContain('uncalibrated: ΔW = 0');
	});
});
