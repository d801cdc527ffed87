// The run itself: steps furnace → cell → well → SPRT → bridge in simulated time and yields, in time
// order, bench events and readings (plus silent ticks during a dropout, for the ground truth).
// Deterministic for given parameters and seed, so it can be replayed: once for the truth, once lazily
// for the readings.

import {
	fixedPoint,
	hydrostaticCorrectionKelvin,
	pressureCorrectionKelvin,
	raoultDepressionKelvin
} from '../../src/lib/metrology/index';
import { Bridge } from './bridge';
import { Cell, type CellState, type Phase } from './cell';
import { corrupt, inDropout, planFaults, type FaultPlan } from './faults';
import type { ScenarioParams } from './params';
import { createRng } from './prng';
import { Furnace, heatFlowWatt, lagStep } from './thermal';
import { currentAt, elementResistanceOhm, resistanceSlopeOhmPerKelvin, selfHeatingKelvin } from './thermometer';
import type { BadValueKind, SimEvent, SimReading } from './types';

export interface Sample {
	timeMs: number;
	elapsedS: number;
	furnaceK: number;
	sampleK: number;
	/** What a lag-free sensor in the well would read: sample plus the immersion leak from the furnace. */
	sensedK: number;
	wellK: number;
	elementK: number;
	currentMilliAmp: number;
	liquidFraction: number;
	phase: Phase;
}

export type PipelineItem =
	| { type: 'event'; event: SimEvent }
	| { type: 'reading'; reading: SimReading; sample: Sample; tag?: BadValueKind | 'outlier' }
	| { type: 'silent'; sample: Sample };

/** Numbers fixed by the parameters alone, shared by the engine and the truth. */
export interface Derived {
	assignedKelvin: number;
	hydrostaticKelvin: number;
	pressureKelvin: number;
	pureKelvin: number;
	liquidusDepressionKelvin: number;
	latentHeatJoule: number;
	heatCapacityJPerKelvin: number;
	faults: FaultPlan;
}

export function derive(p: ScenarioParams): Derived {
	const fp = fixedPoint(p.point);
	const hydrostaticKelvin = hydrostaticCorrectionKelvin(p.point, p.depthMetre);
	const pressureKelvin = pressureCorrectionKelvin(p.point, p.pressurePa);
	const moles = (p.sampleMassKg * 1000) / p.molarMassGramPerMol;
	return {
		assignedKelvin: fp.t90,
		hydrostaticKelvin,
		pressureKelvin,
		pureKelvin: fp.t90 + hydrostaticKelvin + pressureKelvin,
		liquidusDepressionKelvin: raoultDepressionKelvin(p.point, p.impurityMolFraction, 1),
		latentHeatJoule: moles * fp.enthalpyOfFusionJPerMol,
		heatCapacityJPerKelvin: moles * p.molarHeatCapacityJPerMolKelvin + p.cellHeatCapacityJPerKelvin,
		faults: planFaults(p)
	};
}

/** Longest physics step: the lags are updated exactly, the cell by explicit Euler (C/G ≫ 2 s). */
const MAX_STEP_S = 2;

export function validateParams(p: ScenarioParams): void {
	const bad = (m: string) => {
		throw new Error(`invalid parameters: ${m}`);
	};
	if (!(p.readingIntervalS >= 0.1 && p.readingIntervalS <= 60)) bad('readingIntervalS must be within 0.1–60 s');
	if (!(p.conductanceWattPerKelvin > 0)) bad('conductanceWattPerKelvin must be > 0');
	if (!(p.sampleMassKg > 0)) bad('sampleMassKg must be > 0');
	if (p.kind === 'freeze' && !(p.furnaceOffsetKelvin < 0)) bad('a freeze needs furnaceOffsetKelvin < 0');
	if (p.kind === 'melt' && !(p.furnaceOffsetKelvin > 0)) bad('a melt needs furnaceOffsetKelvin > 0');
	if (!(p.lowCurrentMilliAmp > 0 && p.highCurrentMilliAmp > 0 && p.highCurrentMilliAmp <= 50)) bad('currents must be > 0 and ≤ 50 mA');
	if (!(p.channel >= 0 && p.channel <= 63 && Number.isInteger(p.channel))) bad('channel must be an integer 0–63');
	if (!(p.solidusLiquidFraction > 0 && p.solidusLiquidFraction < 0.5)) bad('solidusLiquidFraction must be within (0, 0.5)');
	if (p.kind === 'triple-point' && !(p.initialLiquidFraction > 0 && p.initialLiquidFraction < 1)) bad('initialLiquidFraction must be within (0, 1)');
	const worst = Math.max(Math.abs(p.furnaceOffsetKelvin), Math.abs(p.precoolOffsetKelvin ?? 0), Math.abs(p.startOffsetKelvin), p.fault === 'drift' ? Math.abs(p.driftLimitKelvin) : 0);
	if (worst > 4.5) bad('offsets beyond 4.5 K from the point leave the SPRT sub-range margin of the metrology core');
}

export function* pipeline(p: ScenarioParams, seed: number, d: Derived = derive(p)): Generator<PipelineItem> {
	const rng = createRng(seed, 'bench');
	const bridge = new Bridge(
		{
			resistor: p.resistor,
			bathTemperatureCelsius: p.resistorBathCelsius,
			bathWanderMilliKelvin: p.resistorBathWanderMilliKelvin,
			noise: {
				whiteNoiseMicroKelvin: p.whiteNoiseMicroKelvin,
				correlatedNoiseMicroKelvin: p.correlatedNoiseMicroKelvin,
				correlationTimeS: p.correlationTimeS,
				outlierProbability: p.outlierProbability,
				outlierMicroKelvin: p.outlierMicroKelvin
			}
		},
		rng.fork('bridge')
	);
	const cell = new Cell({
		pureKelvin: d.pureKelvin,
		depressionKelvin: (f) => raoultDepressionKelvin(p.point, p.impurityMolFraction, f),
		solidusLiquidFraction: p.solidusLiquidFraction,
		heatCapacityJPerKelvin: d.heatCapacityJPerKelvin,
		latentHeatJoule: d.latentHeatJoule
	});
	const th = p.thermometer;
	const ohmPerKelvin = resistanceSlopeOhmPerKelvin(th, d.pureKelvin);
	const at = (s: number) => p.epochMs + Math.round(s * 1000);
	const ev = (s: number, kind: SimEvent['kind'], note?: string, durationMs?: number): PipelineItem => ({
		type: 'event',
		event: durationMs === undefined ? { timeMs: at(s), kind, ...(note ? { note } : {}) } : { timeMs: at(s), kind, ...(note ? { note } : {}), durationMs }
	});

	// initial state
	let state: CellState;
	let furnace: Furnace;
	const pointK = d.pureKelvin;
	const plateauSetpointK = pointK + p.furnaceOffsetKelvin;
	let current = currentAt(p, 0);
	if (p.kind === 'triple-point') {
		state = cell.twoPhase(p.initialLiquidFraction);
		furnace = new Furnace(plateauSetpointK, plateauSetpointK, p.furnaceRampKelvinPerMinute);
	} else if (p.kind === 'freeze') {
		state = { phase: 'liquid', liquidFraction: 1, temperatureK: pointK + p.startOffsetKelvin };
		furnace = new Furnace(state.temperatureK, pointK + (p.precoolOffsetKelvin ?? p.furnaceOffsetKelvin), p.furnaceRampKelvinPerMinute);
	} else {
		state = { phase: 'solid', liquidFraction: 0, temperatureK: pointK + p.startOffsetKelvin };
		furnace = new Furnace(state.temperatureK, plateauSetpointK, p.furnaceRampKelvinPerMinute);
	}
	const sensed = () => state.temperatureK + p.immersionCouplingFraction * (furnace.temperatureK - state.temperatureK);
	let wellK = sensed() + (p.kind === 'triple-point' ? p.insertionOffsetKelvin : 0);
	let elementK = wellK + selfHeatingKelvin(th, current);

	if (p.kind === 'triple-point') {
		yield ev(0, 'inner-interface-formed', 'mantle and inner melt formed before the run; SPRT inserted');
	} else {
		yield ev(0, 'furnace-setpoint-changed', `set point ${(furnace.setpointK - pointK).toFixed(3)} K from the point`);
	}

	let nucleated = p.kind !== 'freeze';
	let meltOnsetS: number | null = null;
	let innerDueS: number | null = null;
	let innerDone = p.kind === 'triple-point';
	let controlLost = false;
	let finishedAtS: number | null = null;
	const maxS = (p.durationHours ?? p.maxDurationHours) * 3600;
	const dtTick = p.readingIntervalS;
	let seq = 0;
	let lastTimeMs: number | null = null;
	let badIdx = 0;
	let dropoutOpen = false;
	const disconnects = [...d.faults.disconnects];
	const pending: PipelineItem[] = [];

	const advance = (fromS: number, toS: number) => {
		let t = fromS;
		while (t < toS - 1e-9) {
			const dt = Math.min(MAX_STEP_S, toS - t);
			t += dt;
			furnace.step(dt);
			const before = state.phase;
			state = cell.step(state, heatFlowWatt(p.conductanceWattPerKelvin, furnace.temperatureK, state.temperatureK), dt);
			wellK = lagStep(wellK, sensed(), dt, p.wellTimeConstantS);
			elementK = lagStep(elementK, wellK + selfHeatingKelvin(th, current), dt, p.thermometerTimeConstantS);

			if (!nucleated && state.phase === 'liquid') {
				const liquidusK = cell.equilibriumKelvin(1);
				const byDepth = state.temperatureK <= liquidusK - p.supercoolKelvin;
				const byTime = p.nucleationAtMinutes !== null && t >= p.nucleationAtMinutes * 60 && state.temperatureK < liquidusK;
				if (byDepth || byTime) {
					const supercool = liquidusK - state.temperatureK;
					state = cell.nucleate(state);
					nucleated = true;
					pending.push(ev(t, 'nucleation-induced', `supercooled ${(supercool * 1000).toFixed(0)} mK; recalescence`));
					if (furnace.setpointK !== plateauSetpointK) {
						furnace.setSetpoint(plateauSetpointK);
						pending.push(ev(t, 'furnace-setpoint-changed', `set point ${p.furnaceOffsetKelvin.toFixed(3)} K from the point for the plateau`));
					}
					if (p.innerInterfaceAfterMinutes !== null) innerDueS = t + p.innerInterfaceAfterMinutes * 60;
				}
			}
			if (p.kind === 'melt' && meltOnsetS === null && before === 'solid' && state.phase === 'two-phase') {
				meltOnsetS = t;
				if (p.innerInterfaceAfterMinutes !== null) innerDueS = t + p.innerInterfaceAfterMinutes * 60;
			}
			if (!innerDone && innerDueS !== null && t >= innerDueS && state.phase === 'two-phase') {
				innerDone = true;
				const sign = p.kind === 'freeze' ? -1 : 1;
				wellK += sign * p.innerInterfaceKickKelvin;
				pending.push(ev(t, 'inner-interface-formed', p.kind === 'freeze' ? 'cold rods in the well: inner freeze' : 'heater rod in the well: inner melt'));
			}
			if (!controlLost && d.faults.furnaceControlLostAtS !== null && t >= d.faults.furnaceControlLostAtS) {
				controlLost = true;
				const dir = Math.sign(p.driftKelvinPerHour) || 1;
				furnace.loseControl(p.driftKelvinPerHour, pointK + dir * Math.abs(p.driftLimitKelvin));
				pending.push(ev(t, 'fault-furnace-control-lost', `furnace runs away at ${p.driftKelvinPerHour} K/h`));
			}
			if (finishedAtS === null && nucleated && state.phase !== 'two-phase' && (meltOnsetS !== null || p.kind !== 'melt')) {
				// the phase change is over (freeze: all solid; melt: all liquid)
				finishedAtS = t;
			}
		}
	};

	for (let k = 0; ; k++) {
		const tS = k * dtTick;
		if (tS > maxS) break;
		if (p.durationHours === null && finishedAtS !== null && tS > finishedAtS + p.afterKneeMinutes * 60) break;
		if (k > 0) advance(tS - dtTick, tS);
		yield* pending.splice(0);

		const nextCurrent = currentAt(p, tS);
		if (nextCurrent !== current) {
			current = nextCurrent;
			yield ev(tS, 'current-changed', `${current} mA`);
		}
		while (disconnects.length && disconnects[0].atS <= tS) {
			const dc = disconnects.shift()!;
			yield ev(dc.atS, 'fault-disconnect', `network link down for ${dc.durationS} s`, dc.durationS * 1000);
		}
		const sample: Sample = {
			timeMs: at(tS),
			elapsedS: tS,
			furnaceK: furnace.temperatureK,
			sampleK: state.temperatureK,
			sensedK: sensed(),
			wellK,
			elementK,
			currentMilliAmp: current,
			liquidFraction: state.liquidFraction,
			phase: state.phase
		};
		const silent = inDropout(d.faults, tS);
		if (silent !== dropoutOpen) {
			dropoutOpen = silent;
			yield ev(tS, silent ? 'fault-dropout-start' : 'fault-dropout-end', silent ? 'bridge stopped reporting' : 'bridge reporting again');
		}
		// noise is drawn for every tick, silent or not, so a dropout does not shift later noise
		const { noiseK, outlier } = bridge.noiseKelvin(dtTick);
		const ratio = bridge.ratio(elementResistanceOhm(th, elementK) + noiseK * ohmPerKelvin, dtTick);
		if (silent) {
			yield { type: 'silent', sample };
			continue;
		}
		const reading: SimReading = { seq, timeMs: sample.timeMs, ratio, currentMilliAmp: current, channel: p.channel };
		seq++;
		const bad = d.faults.badValues[badIdx];
		if (bad && bad.atS <= tS) {
			badIdx++;
			const out = corrupt(reading, bad.kind, lastTimeMs, dtTick);
			yield ev(tS, 'fault-bad-value', `${bad.kind} at seq ${reading.seq}`);
			for (const r of out) yield { type: 'reading', reading: r, sample, tag: bad.kind };
		} else {
			yield { type: 'reading', reading, sample, ...(outlier ? { tag: 'outlier' as const } : {}) };
		}
		lastTimeMs = reading.timeMs;
	}
}
