/**
 * Synthetic runs with known truth, for the unit tests only (no simulator dependency).
 * The shapes are deliberately simple: straight approach, a plateau with optional Raoult term,
 * straight departure, AR(1) noise, spikes, and I² self-heating.
 */
import type { PlateauKind, Sample } from './types';

export function mulberry32(seed: number): () => number {
	let s = seed >>> 0;
	return () => {
		s = (s + 0x6d2b79f5) >>> 0;
		let t = s;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

export function gaussian(rand: () => number): number {
	const u = Math.max(rand(), 1e-300);
	return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
}

export interface SyntheticRun {
	kind: PlateauKind;
	dtS?: number;
	/** plateau start and duration (s) */
	startS?: number;
	durationS?: number;
	/** readings after the plateau (s) */
	tailS?: number;
	plateauKelvin?: number;
	slopeMilliKelvinPerHour?: number;
	/** Raoult liquidus depression c/A (K): melt T = T0 − B/F, freeze T = T0 − B/F with F the liquid fraction */
	raoultKelvin?: number;
	/** approach rate towards the plateau (K/h, positive) */
	approachKelvinPerHour?: number;
	/** departure rate after the plateau (K/h, positive) */
	departKelvinPerHour?: number;
	/** freeze: undercooling depth (K) and rebound duration (s) */
	undercoolKelvin?: number;
	reboundS?: number;
	noiseKelvin?: number;
	rho?: number;
	outlierProbability?: number;
	outlierKelvin?: number;
	/** self-heating at 1 mA (K) and current schedule [fromTimeS, mA] */
	selfHeatingKelvinAt1mA?: number;
	currents?: [number, number][];
	/** gaps [fromS, toS] with no readings */
	gaps?: [number, number][];
	/** thermometer time constant (s): the sensor follows the cell as a first-order lag; 0 = none */
	sensorTauS?: number;
	seed?: number;
}

export interface SyntheticTruth {
	start: number;
	end: number;
	/** zero-current plateau temperature at the start of the plateau (K) */
	plateauKelvin: number;
	slopeMilliKelvinPerHour: number;
	raoultKelvin: number;
	selfHeatingKelvinAt1mA: number;
}

/** Noise-free zero-current temperature of the run at time t. */
export function idealKelvin(r: Required<SyntheticRun>, t: number): number {
	const start = r.startS;
	const end = r.startS + r.durationS;
	const minF = 0.02;
	const plateau = (tt: number): number => {
		const x = Math.min(Math.max((tt - start) / r.durationS, 0), 1);
		const liquid = r.kind === 'freeze' ? 1 - x : x;
		const raoult = r.raoultKelvin > 0 ? r.raoultKelvin / Math.max(liquid, minF) : 0;
		return r.plateauKelvin + (r.slopeMilliKelvinPerHour / 3.6e6) * (tt - start) - raoult;
	};
	if (t >= start && t <= end) return plateau(t);
	if (t > end) {
		const dir = r.kind === 'freeze' ? -1 : 1;
		return plateau(end) + (dir * r.departKelvinPerHour * (t - end)) / 3600;
	}
	if (r.kind === 'freeze') {
		const nucleation = start - r.reboundS;
		const bottom = r.plateauKelvin - r.undercoolKelvin;
		if (t >= nucleation) return bottom + ((plateau(start) - bottom) * (t - nucleation)) / r.reboundS;
		return bottom + (r.approachKelvinPerHour * (nucleation - t)) / 3600;
	}
	return plateau(start) - (r.approachKelvinPerHour * (start - t)) / 3600;
}

export function syntheticRun(run: SyntheticRun): { samples: Sample[]; truth: SyntheticTruth; run: Required<SyntheticRun> } {
	const r: Required<SyntheticRun> = {
		dtS: 10,
		startS: 3600,
		durationS: 8 * 3600,
		tailS: 3600,
		plateauKelvin: 429.7485,
		slopeMilliKelvinPerHour: 0,
		raoultKelvin: 0,
		approachKelvinPerHour: 2,
		departKelvinPerHour: 5,
		undercoolKelvin: 0.5,
		reboundS: 300,
		noiseKelvin: 30e-6,
		rho: 0,
		outlierProbability: 0,
		outlierKelvin: 0.01,
		selfHeatingKelvinAt1mA: 0,
		currents: [],
		gaps: [],
		sensorTauS: 0,
		seed: 1,
		...run
	};
	const rand = mulberry32(r.seed);
	const samples: Sample[] = [];
	let e = 0;
	const tEnd = r.startS + r.durationS + r.tailS;
	const innovation = Math.sqrt(1 - r.rho * r.rho);
	let sensed = NaN;
	const follow = r.sensorTauS > 0 ? 1 - Math.exp(-r.dtS / r.sensorTauS) : 1;
	for (let t = 0; t <= tEnd; t += r.dtS) {
		e = r.rho * e + innovation * gaussian(rand);
		const cell = idealKelvin(r, t);
		sensed = Number.isNaN(sensed) ? cell : sensed + (cell - sensed) * follow;
		if (r.gaps.some(([a, b]) => t >= a && t < b)) continue;
		let current: number | undefined;
		for (const [from, mA] of r.currents) if (t >= from) current = mA;
		const i = current ?? 1;
		let kelvin = sensed + r.noiseKelvin * e + r.selfHeatingKelvinAt1mA * i * i;
		if (r.outlierProbability > 0 && rand() < r.outlierProbability) kelvin += (rand() < 0.5 ? -1 : 1) * r.outlierKelvin;
		samples.push(current === undefined ? { t, kelvin } : { t, kelvin, currentMilliAmp: current });
	}
	return {
		samples,
		run: r,
		truth: {
			start: r.startS,
			end: r.startS + r.durationS,
			plateauKelvin: r.plateauKelvin,
			slopeMilliKelvinPerHour: r.slopeMilliKelvinPerHour,
			raoultKelvin: r.raoultKelvin,
			selfHeatingKelvinAt1mA: r.selfHeatingKelvinAt1mA
		}
	};
}
