import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fixedPoint } from '../metrology/index';
import { analyseRun } from './index';
import { idealKelvin, syntheticRun, type SyntheticRun } from './synthetic';

const currentsEvery = (fromS: number, periodS: number, forS: number, untilS: number): [number, number][] => {
	const c: [number, number][] = [[0, 1]];
	for (let t = fromS; t < untilS; t += periodS) c.push([t, 1.414], [t + forS, 1]);
	return c;
};

function analyse(spec: SyntheticRun, extra: Partial<Parameters<typeof analyseRun>[1]> = {}) {
	const { samples, truth } = syntheticRun(spec);
	return { a: analyseRun(samples, { kind: spec.kind, ...extra }), truth };
}

describe('final analysis recovers a known run', () => {
	it('melt: start, end, mean, slope and noise', () => {
		const { a, truth } = analyse({ kind: 'melt', slopeMilliKelvinPerHour: 0.8, noiseKelvin: 30e-6, seed: 2 });
		const p = a.plateau!;
		const duration = truth.end - truth.start;
		expect(Math.abs(p.start - truth.start) / duration).toBeLessThan(0.01);
		expect(Math.abs(p.end - truth.end) / duration).toBeLessThan(0.01);
		expect(a.endObserved).toBe(true);
		// the mean over the symmetric 20–80 % window equals the mean over the plateau for a linear drift
		expect(p.meanKelvin).toBeCloseTo(truth.plateauKelvin + (0.8e-3 * (duration / 3600)) / 2, 5);
		expect(Math.abs(p.slopeMilliKelvinPerHour - 0.8)).toBeLessThan(4 * p.slopeStdErrMilliKelvinPerHour + 1e-3);
		expect(p.noiseMilliKelvin).toBeGreaterThan(0.025);
		expect(p.noiseMilliKelvin).toBeLessThan(0.035);
		expect(p.slopeWindow.start).toBeCloseTo(p.start + 0.2 * (p.end - p.start), 6);
		expect(p.selfHeatingMilliKelvin).toBeNull();
	});

	it('freeze with spikes and a gap: the window is still found', () => {
		const { a, truth } = analyse({ kind: 'freeze', outlierProbability: 0.005, outlierKelvin: 3e-3, gaps: [[12000, 13200]], seed: 4 });
		const p = a.plateau!;
		const duration = truth.end - truth.start;
		expect(Math.abs(p.start - truth.start) / duration).toBeLessThan(0.01);
		expect(Math.abs(p.end - truth.end) / duration).toBeLessThan(0.01);
		expect(a.outliers).toBeGreaterThan(5);
		expect(Math.abs(p.meanKelvin - truth.plateauKelvin)).toBeLessThan(10e-6);
	});

	it('two currents: self-heating at the lower current, and meanKelvin is the zero-current value', () => {
		const { a, truth } = analyse({
			kind: 'melt',
			selfHeatingKelvinAt1mA: 0.9e-3,
			currents: currentsEvery(7200, 5400, 360, 30000),
			rho: 0.6,
			seed: 7
		});
		const p = a.plateau!;
		expect(p.selfHeatingMilliKelvin!).toBeCloseTo(0.9, 1);
		expect(Math.abs(p.meanKelvin - truth.plateauKelvin)).toBeLessThan(40e-6); // AR(1) noise: a few u of the mean
		expect(a.selfHeating!.meanAtLowCurrentKelvin - p.meanKelvin).toBeCloseTo(0.9e-3, 4);
		expect(a.selfHeating!.steps.length).toBeGreaterThanOrEqual(8);
	});

	it('Raoult freeze: 1/F slope gives c/A, the liquidus and the apparent impurity', () => {
		const raoult = 0.2e-3; // c/A, K
		const { a, truth } = analyse({ kind: 'freeze', raoultKelvin: raoult, noiseKelvin: 10e-6, plateauKelvin: 505.078, seed: 3 }, { point: 'Sn' });
		const fit = a.inverseFractionFit!;
		expect(fit.slopeMilliKelvin).toBeCloseTo(-0.2, 1);
		expect(fit.pureKelvin).toBeCloseTo(truth.plateauKelvin, 5);
		expect(a.liquidusKelvin!).toBeCloseTo(truth.plateauKelvin - raoult, 5);
		const expectedC = raoult * fixedPoint('Sn').cryoscopicConstantPerKelvin;
		expect(a.impurity.apparentMolFraction! / expectedC).toBeGreaterThan(0.85);
		expect(a.impurity.apparentMolFraction! / expectedC).toBeLessThan(1.15);
		expect(a.fractionSlopes.map((s) => [s.fractionFrom, s.fractionTo])).toEqual([
			[0.1, 0.5],
			[0.2, 0.8]
		]);
		// the roll-off steepens: the later interval falls faster
		expect(a.fractionSlopes[1].slopeMilliKelvinPerHour).toBeLessThan(a.fractionSlopes[0].slopeMilliKelvinPerHour);
		expect(a.fractionCurve.length).toBeGreaterThan(100);
		expect(a.fractionCurve.every((q) => Number.isFinite(q.inverseLiquidFraction))).toBe(true);
	});

	it('corrections, result against the assigned value and a budget with named, sourced lines', () => {
		const fp = fixedPoint('Zn');
		const depth = 0.18;
		const { a } = analyse(
			{ kind: 'freeze', plateauKelvin: fp.t90 + fp.dTdl * depth + fp.dTdp * (101800 - 101325) + 0.1e-3, currents: currentsEvery(7200, 5400, 360, 30000), selfHeatingKelvinAt1mA: 1e-3 },
			{ point: 'Zn', depthMetre: depth, pressurePa: 101800, purityPercent: 99.99999 }
		);
		expect(a.corrections.hydrostaticMilliKelvin!).toBeCloseTo(fp.dTdl * depth * 1000, 9);
		expect(a.corrections.pressureMilliKelvin!).toBeCloseTo(fp.dTdp * 475 * 1000, 9);
		expect(a.result!.deltaMilliKelvin).toBeCloseTo(0.1, 1);
		expect(a.result!.assignedWr).toBe(fp.wr);
		expect(a.result!.wr).toBeGreaterThan(fp.wr);
		const b = a.budget!;
		const names = b.components.map((c) => c.name);
		expect(names).toEqual([
			'repeatability (plateau mean)',
			'plateau slope over the window',
			'self-heating extrapolation to zero current',
			'hydrostatic-head correction',
			'pressure correction',
			'impurities (OME)'
		]);
		expect(b.sources.every((s) => s.source.length > 10)).toBe(true);
		expect(b.components.find((c) => c.name === 'impurities (OME)')!.distribution).toBe('rectangular');
		expect(b.expandedUncertainty).toBeCloseTo(2 * b.combinedStandardUncertainty, 12);
		expect(a.impurity.omeMilliKelvin!).toBeCloseTo((1e-7 / fp.cryoscopicConstantPerKelvin) * 1000, 6);
	});

	it('a run that ends on the plateau reports the window to the last reading and no fraction curve', () => {
		const { a } = analyse({ kind: 'triple-point', plateauKelvin: 273.16, tailS: 0, durationS: 6 * 3600, approachKelvinPerHour: 3 });
		expect(a.endObserved).toBe(false);
		expect(a.plateau!.end).toBe(3600 + 6 * 3600);
		expect(a.fractionCurve).toEqual([]);
	});
});

describe('final analysis: robustness and honesty', () => {
	it('furnace ramps (≥ 50 mK/h) give no plateau', () => {
		fc.assert(
			fc.property(fc.double({ min: 50, max: 3000, noNaN: true }), fc.constantFrom(1, -1), fc.integer({ min: 1, max: 1000 }), (rate, sign, seed) => {
				const samples = Array.from({ length: 2160 }, (_, k) => ({ t: k * 10, kelvin: 600 + (sign * rate * k * 10) / 3.6e6 + 3e-5 * Math.sin(seed * k) }));
				return analyseRun(samples, { kind: 'melt' }).plateau === null;
			}),
			{ numRuns: 30 }
		);
	});

	it('AR(1) noise: stated slope u covers the scatter of slope estimates over many seeds (ratio 0.6–1.6)', () => {
		const slopes: number[] = [];
		const us: number[] = [];
		for (let seed = 1; seed <= 60; seed++) {
			const { a } = analyse({ kind: 'melt', seed, rho: 0.9, noiseKelvin: 40e-6, slopeMilliKelvinPerHour: 0.5 });
			slopes.push(a.plateau!.slopeMilliKelvinPerHour);
			us.push(a.plateau!.slopeStdErrMilliKelvinPerHour);
		}
		const m = slopes.reduce((x, y) => x + y, 0) / slopes.length;
		const sd = Math.sqrt(slopes.reduce((x, y) => x + (y - m) ** 2, 0) / (slopes.length - 1));
		const ratio = sd / (us.reduce((x, y) => x + y, 0) / us.length);
		expect(ratio).toBeGreaterThan(0.6);
		expect(ratio).toBeLessThan(1.6);
	});

	it('too little data or garbage gives a null plateau, never a throw', () => {
		expect(analyseRun([], { kind: 'melt' }).plateau).toBeNull();
		expect(analyseRun([{ t: 0, kelvin: Number.NaN }], { kind: 'freeze' }).plateau).toBeNull();
	});
});

describe('final analysis: onset after the recalescence of a freeze', () => {
	// The thermometer follows the cell as a first-order lag (Newton's law of cooling; common practice
	// for an immersed thermometer's response), so after recalescence it creeps up onto the plateau and
	// is settled once within the band (0.1 mK) of the cell. A short (25-min) freeze with a current
	// switch 50 s after that moment: the readings at the onset are masked by the switch's settling.
	const BAND_K = 1e-4;
	const base: SyntheticRun = {
		kind: 'freeze',
		dtS: 1,
		startS: 1200,
		durationS: 1500,
		tailS: 600,
		reboundS: 60,
		undercoolKelvin: 0.3,
		slopeMilliKelvinPerHour: -0.5,
		sensorTauS: 50,
		selfHeatingKelvinAt1mA: 0.9e-3
	};
	const settledAt = (): number => {
		const quiet = syntheticRun({ ...base, noiseKelvin: 0, selfHeatingKelvinAt1mA: 0 });
		const nucleation = base.startS! - base.reboundS!;
		return quiet.samples.find((s) => s.t > nucleation && Math.abs(s.kelvin - idealKelvin(quiet.run, s.t)) < BAND_K)!.t;
	};

	it('the onset is where the recovery falls within the band, also when a current switch masks it', () => {
		const onset = settledAt();
		expect(onset).toBeGreaterThan(base.startS!); // the sensor settles well after the cell's recovery
		for (const seed of [1, 2, 3, 4, 5]) {
			const spec: SyntheticRun = { ...base, noiseKelvin: 25e-6, seed, currents: [[0, 1], [onset + 50, 1.414], [onset + 290, 1], [onset + 1100, 1.414], [onset + 1340, 1]] };
			const { samples } = syntheticRun(spec);
			const p = analyseRun(samples, { kind: 'freeze' }).plateau!;
			expect(Math.abs(p.start - onset) / base.durationS!).toBeLessThan(0.01); // goal: ≤ 1 % of the plateau
		}
	});
});
