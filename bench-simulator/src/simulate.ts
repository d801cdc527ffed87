// simulate(): everything in memory. simulateStream(): the truth first (one pass that keeps no
// readings), then a lazy second pass over the same deterministic run for the readings.

import { derive, pipeline, validateParams } from './engine';
import type { ScenarioOverrides, ScenarioParams } from './params';
import { findScenario, resolveParams, SCENARIOS } from './scenarios';
import { TruthBuilder, type NoiseFreeTrace } from './truth';
import type { GroundTruth, SimEvent, SimReading } from './types';
import type { FixedPointId, RealizationKind } from '../../src/lib/metrology/index';
import type { FaultKind } from './params';

export const DEFAULT_SEED = 1;

export function listScenarios(): { name: string; description: string; point: FixedPointId; kind: RealizationKind; fault?: FaultKind }[] {
	return SCENARIOS.map((s) => ({ name: s.name, description: s.description, point: s.point, kind: s.kind, ...(s.fault ? { fault: s.fault } : {}) }));
}

function prepare(scenario: string, overrides: ScenarioOverrides | undefined): ScenarioParams {
	findScenario(scenario);
	const p = resolveParams(scenario, overrides ?? {});
	validateParams(p);
	return p;
}

export function simulate(
	scenario: string,
	overrides?: ScenarioOverrides,
	seed: number = DEFAULT_SEED
): { readings: SimReading[]; events: SimEvent[]; truth: GroundTruth; trace: NoiseFreeTrace } {
	const p = prepare(scenario, overrides);
	const d = derive(p);
	const truth = new TruthBuilder(scenario, seed, p, d);
	const readings: SimReading[] = [];
	const events: SimEvent[] = [];
	for (const item of pipeline(p, seed, d)) {
		truth.add(item);
		if (item.type === 'reading') readings.push(item.reading);
		else if (item.type === 'event') events.push(item.event);
	}
	// the trace is handed out beside the truth (not in it): a detector's slope is scored over the
	// window the detector states, which only the noise-free run itself can answer
	return { readings, events, truth: truth.finish(), trace: truth.trace() };
}

export interface SimStream {
	truth: GroundTruth;
	events: SimEvent[];
	params: ScenarioParams;
	/** Lazy: each iteration replays the run, holding one reading at a time. */
	readings: Iterable<SimReading>;
	/** Readings and events interleaved in simulated-time order (what a live bench emits). */
	items: Iterable<{ type: 'reading'; reading: SimReading } | { type: 'event'; event: SimEvent }>;
}

export function simulateStream(scenario: string, overrides?: ScenarioOverrides, seed: number = DEFAULT_SEED): SimStream {
	const p = prepare(scenario, overrides);
	const d = derive(p);
	const tb = new TruthBuilder(scenario, seed, p, d);
	const events: SimEvent[] = [];
	for (const item of pipeline(p, seed, d)) {
		tb.add(item);
		if (item.type === 'event') events.push(item.event);
	}
	const truth = tb.finish();
	return {
		truth,
		events,
		params: p,
		readings: {
			*[Symbol.iterator]() {
				for (const item of pipeline(p, seed, d)) if (item.type === 'reading') yield item.reading;
			}
		},
		items: {
			*[Symbol.iterator]() {
				for (const item of pipeline(p, seed, d)) {
					if (item.type === 'reading') yield { type: 'reading' as const, reading: item.reading };
					else if (item.type === 'event') yield { type: 'event' as const, event: item.event };
				}
			}
		}
	};
}
