import { describe, expect, it } from 'vitest';
import { hydrostaticLineMilliKelvin, immersionProfile } from './immersion';

// ITS-90 Table 2, dT/dl in mK per metre of liquid (via /work/shared/reference/its90-data.md, written out
// here by hand rather than read from the metrology core).
const TABLE_2: Record<string, number> = { Hg: 7.1, TPW: -0.73, Ga: -1.2, In: 3.3, Sn: 2.2, Zn: 2.7, Al: 1.6, Ag: 5.4 };

describe('hydrostatic line (ITS-90 Table 2)', () => {
	it.each(Object.entries(TABLE_2))('%s: raising the sensor 1 cm changes T by −dT/dl × 0.01 m', (point, dTdl) => {
		// 1 cm shallower: depth − reference = −0.01 m
		expect(hydrostaticLineMilliKelvin(point as 'Zn', 0.17, 0.18)).toBeCloseTo(-dTdl * 0.01, 10);
	});
	it('zinc: 5 cm up from 180 mm is −0.135 mK (2.7 mK/m × 0.05 m)', () => {
		expect(hydrostaticLineMilliKelvin('Zn', 0.13, 0.18)).toBeCloseTo(-0.135, 10);
	});
	it('water and gallium have negative coefficients: raising the sensor warms it', () => {
		expect(hydrostaticLineMilliKelvin('TPW', 0.2, 0.25)).toBeCloseTo(0.0365, 10);
		expect(hydrostaticLineMilliKelvin('Ga', 0.1, 0.15)).toBeCloseTo(0.06, 10);
	});
});

describe('immersion profile', () => {
	const depths = [0.18, 0.17, 0.16, 0.15, 0.14, 0.13];
	it('a profile on the tin line follows it, relative to the deepest step', () => {
		// values built by hand: 505.078 K + 2.2e-3 K/m × (depth − 0.18 m), plus a 5 µK wobble
		const steps = depths.map((d, i) => ({ depthMetre: d, valueKelvin: 505.078 + 2.2e-3 * (d - 0.18) + (i % 2 ? 5e-6 : -5e-6) }));
		const p = immersionProfile('Sn', steps, 0.1)!;
		expect(p.dTdlMilliKelvinPerMetre).toBeCloseTo(2.2, 12);
		expect(p.referenceDepthMetre).toBe(0.18);
		expect(p.points[0].measuredMilliKelvin).toBe(0);
		expect(p.points[5].expectedMilliKelvin).toBeCloseTo(-0.11, 10);
		expect(p.points[5].measuredMilliKelvin).toBeCloseTo(-0.11 + 0.01, 6);
		expect(p.follows).toBe(true);
		expect(p.adequateFromDepthMetre).toBe(0.13);
	});
	it('a stem-conduction drop at the shallow steps leaves the line and is reported', () => {
		// the two shallowest steps read 0.15 mK and 0.4 mK below the line
		const extra = [0, 0, 0, 0, -0.15e-3, -0.4e-3];
		const steps = depths.map((d, i) => ({ depthMetre: d, valueKelvin: 692.677 + 2.7e-3 * (d - 0.18) + extra[i] }));
		const p = immersionProfile('Zn', steps, 0.1)!;
		expect(p.follows).toBe(false);
		expect(p.points.map((x) => x.within)).toEqual([true, true, true, true, false, false]);
		expect(p.adequateFromDepthMetre).toBe(0.15);
		expect(p.maxResidualMilliKelvin).toBeCloseTo(0.4, 6);
	});
	it('no steps, no profile', () => {
		expect(immersionProfile('Zn', [])).toBeNull();
	});
});
