// What the simulator hands out: protocol readings, bench events and the ground truth.

import type { FixedPointId, RealizationKind, StandardResistor } from '../../src/lib/metrology/index';
import type { NoiseParams } from './bridge';
import type { FaultKind, ScenarioParams } from './params';
import type { Thermometer } from './thermometer';

/** Exactly the fields of one reading in the ingest protocol (docs/ingest-protocol.md). */
export interface SimReading {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel: number;
}

export type SimEventKind =
	| 'furnace-setpoint-changed'
	| 'nucleation-induced'
	| 'inner-interface-formed'
	| 'current-changed'
	| 'fault-dropout-start'
	| 'fault-dropout-end'
	| 'fault-disconnect'
	| 'fault-bad-value'
	| 'fault-furnace-control-lost';

export interface SimEvent {
	timeMs: number;
	kind: SimEventKind;
	note?: string;
	/** For fault-disconnect: how long the link stays down, simulated ms. */
	durationMs?: number;
}

export type BadValueKind = 'nan' | 'negative' | 'duplicate' | 'out-of-order';

export interface GroundTruth {
	scenario: string;
	seed: number;
	point: FixedPointId;
	kind: RealizationKind;
	fault: FaultKind | null;
	epochMs: number;
	endMs: number;
	readingCount: number;
	readingIntervalS: number;
	/** First reading after the last disturbance (nucleation, inner interface, insertion) at which the
	 *  sensor is within 0.1 mK of the cell's equilibrium temperature (self-heating aside). */
	plateauStartMs: number | null;
	/** The knee: the last liquid froze / last solid melted; null if the run ended first. */
	plateauEndMs: number | null;
	nucleationMs: number | null;
	innerInterfaceMs: number | null;
	/** T90 of the point, K (ITS-90 assigned value). */
	assignedKelvin: number;
	hydrostaticKelvin: number;
	pressureKelvin: number;
	/** Impurity-free value at the sensor, incl. head and pressure, K. */
	pureKelvin: number;
	/** pureKelvin minus the Raoult depression at F = 1, K. */
	liquidusKelvin: number;
	liquidusDepressionMilliKelvin: number;
	/** Least-squares slope of the noise-free well temperature over the central plateau, mK/h. */
	trueSlopeMilliKelvinPerHour: number | null;
	slopeWindow: { startMs: number; endMs: number; basis: 'fraction 20-80 %' | 'time 20-80 %' } | null;
	/** First time the liquid fraction passed each 0.05 step in the direction of progress. */
	fractionTimeline: { liquidFraction: number; timeMs: number }[];
	selfHeatingMilliKelvinAtLowCurrent: number;
	selfHeatingMilliKelvinAtHighCurrent: number;
	lowCurrentMilliAmp: number;
	highCurrentMilliAmp: number;
	impurityMolFraction: number;
	noise: NoiseParams;
	thermometer: Thermometer;
	resistor: StandardResistor & { bathTemperatureCelsius: number };
	depthMetre: number;
	pressurePa: number;
	furnaceOffsetKelvin: number;
	conductanceWattPerKelvin: number;
	latentHeatJoule: number;
	/** m L / (G |offset|): the heat-flow estimate of the plateau length, h. */
	expectedPlateauHours: number;
	faults: {
		dropouts: { startMs: number; endMs: number }[];
		disconnects: { atMs: number; durationMs: number }[];
		badValues: { seq: number; kind: BadValueKind; timeMs: number }[];
		furnaceControlLostMs: number | null;
	};
	outlierSeqs: number[];
	notes: string[];
	params: ScenarioParams;
}
