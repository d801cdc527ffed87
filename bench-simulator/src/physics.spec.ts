// Physics of the simulator checked against the metrology core and published ITS-90 values
// (its90-data.md: Table 1 W_r, Table 2 dT/dl, CRC enthalpies of fusion).

import { describe, expect, it } from 'vitest';
import { deviation, resistanceFromBridgeRatio, temperatureFromRatio } from '../../src/lib/metrology/index';
import { simulate } from './index';
import type { GroundTruth, SimReading } from './types';

const R_GAS = 8.314462618;
/** Quiet settings for tests that compare against exact values: no immersion leak, no outliers. */
const QUIET = { immersionCouplingFraction: 0, outlierProbability: 0, epochMs: 0 } as const;

function wOf(r: SimReading, t: GroundTruth): number {
	return resistanceFromBridgeRatio(r.ratio, t.resistor, t.resistor.bathTemperatureCelsius) / t.thermometer.rTpwOhm;
}
function kelvinOf(r: SimReading, t: GroundTruth): number {
	return temperatureFromRatio(wOf(r, t), t.thermometer.subrange, t.thermometer.coefficients);
}
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
/** Readings in [fromMs, toMs] at one current, leaving 5 thermometer time constants after any switch. */
function plateauReadings(rs: SimReading[], fromMs: number, toMs: number, currentMilliAmp: number): SimReading[] {
	const out: SimReading[] = [];
	let lastSwitchMs = -Infinity;
	for (let i = 0; i < rs.length; i++) {
		if (i > 0 && rs[i].currentMilliAmp !== rs[i - 1].currentMilliAmp) lastSwitchMs = rs[i].timeMs;
		const r = rs[i];
		if (r.timeMs >= fromMs && r.timeMs <= toMs && r.currentMilliAmp === currentMilliAmp && r.timeMs - lastSwitchMs > 120_000) out.push(r);
	}
	return out;
}
function fractionTime(t: GroundTruth, f: number): number {
	const x = t.fractionTimeline.find((e) => Math.abs(e.liquidFraction - f) < 1e-9);
	if (!x) throw new Error(`no time for F = ${f}`);
	return x.timeMs;
}

describe('plateau level', () => {
	// published W_r(T90), ITS-90 Table 1
	const cases = [
		{ scenario: 'zn-freeze', wr: 2.5689173 },
		{ scenario: 'tpw-triple-point', wr: 1.0 },
		{ scenario: 'ga-melt', wr: 1.11813889 },
		{ scenario: 'hg-triple-point', wr: 0.84414211 }
	];
	for (const c of cases) {
		it(`${c.scenario}: pure, no head: zero-current W sits at W_r + ΔW(W) of the thermometer`, () => {
			const { readings, truth } = simulate(c.scenario, { ...QUIET, impurityMolFraction: 0, depthMetre: 0, durationHours: 4, highCurrentFirstAtMinutes: 30, highCurrentEveryMinutes: 40, highCurrentForMinutes: 15 }, 3);
			expect(truth.plateauStartMs).not.toBeNull();
			const end = Math.min(truth.plateauEndMs ?? truth.endMs, truth.plateauStartMs! + 3 * 3.6e6);
			const lo = plateauReadings(readings, truth.plateauStartMs!, end, 1).map((r) => wOf(r, truth));
			const hi = plateauReadings(readings, truth.plateauStartMs!, end, 1.414).map((r) => wOf(r, truth));
			expect(lo.length).toBeGreaterThan(100);
			expect(hi.length).toBeGreaterThan(50);
			// zero-current extrapolation R(0) = 2 R(I) - R(√2 I), its90-data.md "Other relations"
			const w0 = 2 * mean(lo) - mean(hi);
			// the thermometer's own W at T90: solve W - ΔW(W) = W_r by fixed-point iteration
			let w = c.wr;
			for (let i = 0; i < 20; i++) w = c.wr + deviation(truth.thermometer.subrange, truth.thermometer.coefficients, w);
			if (c.wr !== 1) expect(Math.abs(w - c.wr)).toBeGreaterThan(1e-5); // the SPRT really is not ideal
			const sensitivityPerK = 4e-3; // |dW/dT| ≈ 4e-3 /K near room temperature, lower at Zn and Hg
			expect(Math.abs(w0 - w) / sensitivityPerK).toBeLessThan(60e-6); // within 60 µK
		});
	}
});

describe('self-heating', () => {
	it('at √2 × the current the self-heating doubles', () => {
		const { readings, truth } = simulate('zn-freeze', { ...QUIET, impurityMolFraction: 0, highCurrentFirstAtMinutes: 60, highCurrentEveryMinutes: 30, highCurrentForMinutes: 15, durationHours: 5 }, 5);
		const pure = 692.677 + 2.7e-3 * truth.depthMetre; // T90 and dT/dl from ITS-90 Tables 1, 2
		const to = truth.plateauStartMs! + 4 * 3.6e6;
		const dLo = mean(plateauReadings(readings, truth.plateauStartMs!, to, 1).map((r) => kelvinOf(r, truth))) - pure;
		const dHi = mean(plateauReadings(readings, truth.plateauStartMs!, to, 1.414).map((r) => kelvinOf(r, truth))) - pure;
		expect(dLo).toBeGreaterThan(0.3e-3);
		expect(dHi / dLo).toBeGreaterThan(1.9);
		expect(dHi / dLo).toBeLessThan(2.1);
		expect(dLo * 1000).toBeCloseTo(truth.selfHeatingMilliKelvinAtLowCurrent, 1);
	});
});

describe('impurity: Raoult 1/F shape', () => {
	it('sn-freeze-impure: T against 1/F has slope -c/A with A = L/(R T²) from published L', () => {
		const c = 5e-6;
		const { readings, truth } = simulate('sn-freeze-impure', { ...QUIET, impurityMolFraction: c, highCurrentForMinutes: 0 }, 11);
		// liquid fraction at a reading: interpolate the truth's fraction timeline
		const tl = truth.fractionTimeline;
		const fAt = (ms: number): number | null => {
			for (let i = 1; i < tl.length; i++) {
				const a = tl[i - 1], b = tl[i];
				if (ms >= a.timeMs && ms <= b.timeMs) return a.liquidFraction + ((ms - a.timeMs) / (b.timeMs - a.timeMs)) * (b.liquidFraction - a.liquidFraction);
			}
			return null;
		};
		const xs: number[] = [], ys: number[] = [];
		for (const r of readings) {
			const f = fAt(r.timeMs);
			if (f === null || f > 0.8 || f < 0.2) continue;
			xs.push(1 / f);
			ys.push(kelvinOf(r, truth));
		}
		expect(xs.length).toBeGreaterThan(1000);
		const xm = mean(xs), ym = mean(ys);
		let sxy = 0, sxx = 0;
		for (let i = 0; i < xs.length; i++) { sxy += (xs[i] - xm) * (ys[i] - ym); sxx += (xs[i] - xm) ** 2; }
		const slope = sxy / sxx;
		const A = 7150 / (R_GAS * 505.078 ** 2); // CRC L(Sn) = 7.150 kJ/mol, T90(Sn)
		expect(slope).toBeLessThan(0);
		expect(slope / (-c / A)).toBeGreaterThan(0.95);
		expect(slope / (-c / A)).toBeLessThan(1.05);
	});

	it('a melt rises toward the liquidus as the liquid fraction grows', () => {
		const { readings, truth } = simulate('in-melt', { ...QUIET, impurityMolFraction: 2e-6, highCurrentForMinutes: 0 }, 2);
		const at = (f: number) => {
			const t0 = fractionTime(truth, f);
			return mean(readings.filter((r) => Math.abs(r.timeMs - t0) < 600_000).map((r) => kelvinOf(r, truth)));
		};
		const t30 = at(0.3), t90 = at(0.9);
		expect(t90).toBeGreaterThan(t30);
		const depression = 2e-6 / (3291 / (R_GAS * 429.7485 ** 2)); // c/A, CRC L(In)
		// Raoult: T(0.9) - T(0.3) = (c/A)(1/0.3 - 1/0.9)
		expect((t90 - t30) / (depression * (1 / 0.3 - 1 / 0.9))).toBeGreaterThan(0.85);
		expect((t90 - t30) / (depression * (1 / 0.3 - 1 / 0.9))).toBeLessThan(1.15);
	});
});

describe('heat balance', () => {
	it('plateau length follows m L / (G ΔT) and scales with 1 / furnace offset', () => {
		const run = (offset: number) => simulate('zn-freeze', { ...QUIET, impurityMolFraction: 0, furnaceOffsetKelvin: offset, precoolOffsetKelvin: -1.5 }, 1).truth;
		const a = run(-1), b = run(-2);
		const span = (t: GroundTruth) => fractionTime(t, 0.2) - fractionTime(t, 0.8);
		// 1.2 kg of Zn (65.38 g/mol), L = 7.068 kJ/mol (CRC), G from the scenario
		const expectedS = (offset: number, g: number) => (0.6 * (1200 / 65.38) * 7068) / (g * offset);
		expect(span(a) / 1000 / expectedS(1, a.conductanceWattPerKelvin)).toBeCloseTo(1, 2);
		expect(span(a) / span(b)).toBeCloseTo(2, 2);
		expect(a.plateauEndMs! - a.plateauStartMs!).toBeGreaterThan(span(a));
	});
});

describe('hydrostatic head', () => {
	it('sensor 0.25 m below the surface reads dT/dl × h higher (Zn: 2.7 mK/m)', () => {
		const level = (depthMetre: number) => {
			const { readings, truth } = simulate('zn-freeze', { ...QUIET, impurityMolFraction: 0, depthMetre, highCurrentForMinutes: 0, durationHours: 4 }, 9);
			return mean(plateauReadings(readings, truth.plateauStartMs!, truth.plateauStartMs! + 3 * 3.6e6, 1).map((r) => kelvinOf(r, truth)));
		};
		const shift = level(0.25) - level(0);
		expect(shift).toBeCloseTo(2.7e-3 * 0.25, 5); // 0.675 mK ± 5 µK
	});
});

describe('supercooling and events', () => {
	it('sn-freeze: the liquid supercools, nucleation is an event, then recalescence brings it back up', () => {
		const { readings, events, truth } = simulate('sn-freeze', { ...QUIET, durationHours: 2 }, 4);
		const nuc = events.find((e) => e.kind === 'nucleation-induced');
		expect(nuc).toBeDefined();
		const before = readings.filter((r) => r.timeMs <= nuc!.timeMs).map((r) => kelvinOf(r, truth));
		expect(Math.min(...before)).toBeLessThan(505.078 - 2); // supercooled by > 2 K
		const after = readings.filter((r) => r.timeMs > nuc!.timeMs + 20 * 60_000).map((r) => kelvinOf(r, truth));
		expect(Math.abs(mean(after) - truth.pureKelvin)).toBeLessThan(5e-3);
		expect(events.some((e) => e.kind === 'inner-interface-formed' && e.timeMs > nuc!.timeMs)).toBe(true);
		expect(events.some((e) => e.kind === 'current-changed')).toBe(true);
	});

	it('freeze ends in a knee: after the last liquid freezes the temperature falls toward the furnace', () => {
		const { readings, truth } = simulate('quick-in-freeze', { ...QUIET }, 1);
		expect(truth.plateauEndMs).not.toBeNull();
		const lastK = kelvinOf(readings[readings.length - 1], truth);
		expect(lastK).toBeLessThan(truth.liquidusKelvin - 0.05);
	});
});

describe('reproducibility and the bridge display', () => {
	it('the same seed gives the same run; another seed does not', () => {
		const a = simulate('quick-in-freeze', { epochMs: 1_700_000_000_000 }, 42);
		const b = simulate('quick-in-freeze', { epochMs: 1_700_000_000_000 }, 42);
		const c = simulate('quick-in-freeze', { epochMs: 1_700_000_000_000 }, 43);
		expect(b.readings).toEqual(a.readings);
		expect(b.truth.plateauStartMs).toBe(a.truth.plateauStartMs);
		expect(c.readings.map((r) => r.ratio)).not.toEqual(a.readings.map((r) => r.ratio));
	});

	it('ratios carry at most 9 significant digits, and usually 8 or 9', () => {
		const { readings } = simulate('ag-freeze', { durationHours: 1, epochMs: 0 }, 8);
		let nine = 0;
		for (const r of readings) {
			const digits = r.ratio.toExponential().split('e')[0].replace('-', '').replace('.', '').length;
			expect(digits).toBeLessThanOrEqual(9);
			if (digits >= 8) nine++;
		}
		expect(nine / readings.length).toBeGreaterThan(0.8);
	});

	it('readings are exactly the protocol fields, with strictly increasing seq and time', () => {
		const { readings, truth } = simulate('quick-in-freeze', { epochMs: 5000 }, 1);
		expect(Object.keys(readings[0]).sort()).toEqual(['channel', 'currentMilliAmp', 'ratio', 'seq', 'timeMs']);
		expect(readings[0].timeMs).toBe(5000);
		for (let i = 1; i < readings.length; i++) {
			expect(readings[i].seq).toBe(readings[i - 1].seq + 1);
			expect(readings[i].timeMs - readings[i - 1].timeMs).toBe(truth.readingIntervalS * 1000);
		}
	});
});

describe('scenario catalogue', () => {
	it('every scenario runs, settles on a plateau near the point, and uses a kind usual for its point', async () => {
		const { listScenarios } = await import('./index');
		const { fixedPoint } = await import('../../src/lib/metrology/index');
		for (const s of listScenarios()) {
			expect(fixedPoint(s.point).usualKinds.includes(s.kind) || (s.point === 'Ar' && s.kind === 'triple-point') || (s.point === 'Hg' && s.kind === 'triple-point'), s.name).toBe(true);
			const { truth } = simulate(s.name, { epochMs: 0, durationHours: 3, readingIntervalS: 10 }, 1);
			expect(truth.plateauStartMs, s.name).not.toBeNull();
			expect(Math.abs(truth.pureKelvin - fixedPoint(s.point).t90), s.name).toBeLessThan(2e-3);
		}
	});
});
