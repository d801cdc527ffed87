import { describe, expect, it } from 'vitest';
import { assessRtpwStability, rtpwEquivalentMilliKelvin, rtpwOhmForMilliKelvin, TPW_REFERENCE_SLOPE_PER_KELVIN } from './rtpw';

// Source: dT = dR_TPW / (R_TPW · dW_r/dT), dW_r/dT(273.16 K) = 3.98853e-3 /K (ITS-90 reference function,
// Eq. 10a differentiated); limit 0.2 mK from NIST practice (Minor & Strouse, NCSLI 2005).
describe('R_TPW equivalent temperature', () => {
	it('uses the slope of the reference function at 273.16 K', () => {
		expect(TPW_REFERENCE_SLOPE_PER_KELVIN).toBeCloseTo(3.98853e-3, 8);
	});

	it('turns a resistance change into mK (worked by hand)', () => {
		// 25.5 Ω SPRT: R·dW_r/dT = 25.5 × 3.98853e-3 = 0.101707515 Ω/K.
		// dR = 20.3415 µΩ → dT = 20.3415e-6 / 0.101707515 = 2.0000e-4 K = 0.2000 mK.
		expect(rtpwEquivalentMilliKelvin(20.3415e-6, 25.5)).toBeCloseTo(0.2, 4);
		// 2.5 Ω high-temperature SPRT: 2.5 × 3.98853e-3 = 9.971325e-3 Ω/K, so 1.994265 µΩ ≙ 0.2 mK.
		expect(rtpwEquivalentMilliKelvin(1.994265e-6, 2.5)).toBeCloseTo(0.2, 4);
		expect(rtpwEquivalentMilliKelvin(-1.01707515e-4, 25.5)).toBeCloseTo(-1.0, 6);
	});

	it('inverts: mK to Ω', () => {
		// 0.2 mK on 25.548312 Ω: 0.2e-3 × 25.548312 × 3.98853e-3 = 2.03800e-5 Ω (by hand: 25.548312 × 3.98853e-3 = 0.1019002).
		expect(rtpwOhmForMilliKelvin(0.2, 25.548312)).toBeCloseTo(2.038e-5, 8);
		expect(rtpwEquivalentMilliKelvin(rtpwOhmForMilliKelvin(0.37, 25.6), 25.6)).toBeCloseTo(0.37, 10);
	});

	it('refuses a non-positive R_TPW', () => {
		expect(() => rtpwEquivalentMilliKelvin(1e-6, 0)).toThrow(RangeError);
	});
});

describe('R_TPW stability flagging', () => {
	const day = 86_400_000;
	// 25.5 Ω thermometer: 1 mK ≙ 101.7075 µΩ. Steps chosen by hand: +5 µΩ (0.049 mK), +10 µΩ (0.098 mK),
	// +30 µΩ (0.295 mK, exceeds 0.2 mK), −25 µΩ (−0.246 mK, exceeds).
	const base = 25.5;
	const checks = [
		{ id: 1, measuredAtMs: 0 * day, rTpwOhm: base },
		{ id: 2, measuredAtMs: 70 * day, rTpwOhm: base + 5e-6 },
		{ id: 3, measuredAtMs: 140 * day, rTpwOhm: base + 15e-6 },
		{ id: 4, measuredAtMs: 210 * day, rTpwOhm: base + 45e-6 },
		{ id: 5, measuredAtMs: 280 * day, rTpwOhm: base + 20e-6 }
	];

	it('flags exactly the consecutive pairs that moved by more than the limit', () => {
		const s = assessRtpwStability(checks, base, 0.2);
		expect(s.flagged).toBe(true);
		expect(s.shifts.map((x) => [x.fromId, x.toId])).toEqual([
			[3, 4],
			[4, 5]
		]);
		expect(s.shifts[0].milliKelvin).toBeCloseTo(0.295, 3);
		expect(s.shifts[1].milliKelvin).toBeCloseTo(-0.246, 3);
		expect(s.checks[0].shiftFromPreviousMilliKelvin).toBeNull();
		expect(s.checks[1].shiftFromPreviousMilliKelvin).toBeCloseTo(0.049, 3);
	});

	it('marks checks outside the band around the reference', () => {
		const s = assessRtpwStability(checks, base, 0.2);
		// from the reference: 0, 0.049, 0.147, 0.442, 0.197 mK → only check 4 is outside ±0.2 mK.
		expect(s.checks.map((c) => c.outsideBand)).toEqual([false, false, false, true, false]);
		expect(s.limitOhm).toBeCloseTo(20.3415e-6, 9);
	});

	it('sorts by time before comparing, and a wider limit clears the flags', () => {
		const shuffled = [checks[3], checks[0], checks[4], checks[2], checks[1]];
		expect(assessRtpwStability(shuffled, base, 0.2).shifts.map((x) => x.toId)).toEqual([4, 5]);
		expect(assessRtpwStability(checks, base, 0.3).flagged).toBe(false);
	});

	it('lets a shift of exactly the limit pass and flags one just past it', () => {
		const exact = rtpwOhmForMilliKelvin(0.2, base) * (1 - 1e-9);
		const over = rtpwOhmForMilliKelvin(0.2, base) * (1 + 1e-6);
		expect(assessRtpwStability([checks[0], { id: 9, measuredAtMs: day, rTpwOhm: base + exact }], base, 0.2).flagged).toBe(false);
		expect(assessRtpwStability([checks[0], { id: 9, measuredAtMs: day, rTpwOhm: base + over }], base, 0.2).flagged).toBe(true);
	});

	it('handles no checks and a single check', () => {
		expect(assessRtpwStability([], base, 0.2)).toMatchObject({ flagged: false, checks: [], shifts: [] });
		expect(assessRtpwStability([checks[0]], base, 0.2).flagged).toBe(false);
	});
});
