// Every knob of a simulated realization. Scenarios (scenarios.ts) fill these in; callers and CLI
// flags override any of them.

import type { FixedPointId, RealizationKind, StandardResistor } from '../../src/lib/metrology/index';
import type { Thermometer } from './thermometer';

export type FaultKind = 'dropout' | 'disconnect' | 'bad-values' | 'drift';
export const FAULT_KINDS: readonly FaultKind[] = ['dropout', 'disconnect', 'bad-values', 'drift'];

export interface ScenarioParams {
	point: FixedPointId;
	kind: RealizationKind;
	fault: FaultKind | null;

	// clock and cadence
	/** Simulated clock start, UTC ms (default: now). */
	epochMs: number;
	readingIntervalS: number;
	/** Fixed run length; null = run until the knee plus afterKneeMinutes (capped by maxDurationHours). */
	durationHours: number | null;
	afterKneeMinutes: number;
	maxDurationHours: number;
	channel: number;

	// furnace / bath and the cell's heat balance
	/** Furnace (bath) set point during the plateau minus the fixed point, K: < 0 freezes, > 0 melts. */
	furnaceOffsetKelvin: number;
	/** Freeze only: set point offset before nucleation (deeper, to supercool); null = furnaceOffsetKelvin. */
	precoolOffsetKelvin: number | null;
	/** Sample (and furnace) temperature at t = 0 relative to the point, K (liquid above for a freeze,
	 *  solid below for a melt; ignored for triple points, which start two-phase). */
	startOffsetKelvin: number;
	furnaceRampKelvinPerMinute: number;
	/** Furnace → sample thermal conductance, W/K. Plateau length ≈ m L / (G |offset|). */
	conductanceWattPerKelvin: number;
	sampleMassKg: number;
	molarMassGramPerMol: number;
	molarHeatCapacityJPerMolKelvin: number;
	cellHeatCapacityJPerKelvin: number;
	/** Triple points: liquid fraction once the mantle and inner interface are formed. */
	initialLiquidFraction: number;

	// nucleation and interfaces
	/** Freeze: supercooling below the liquidus at which the technician induces nucleation, K. */
	supercoolKelvin: number;
	/** Freeze: induce nucleation at this time instead (if the liquid is below its liquidus by then). */
	nucleationAtMinutes: number | null;
	/** Minutes after nucleation (freeze) or start of melting (melt) at which the inner interface is
	 *  formed (cold or warm rod in the well); null = not formed. */
	innerInterfaceAfterMinutes: number | null;
	/** Size of the well disturbance from the rod, K (cold for freezes, warm for melts). */
	innerInterfaceKickKelvin: number;
	/** Triple points: SPRT temperature on insertion relative to the cell, K. */
	insertionOffsetKelvin: number;

	// impurity, head, pressure, immersion
	impurityMolFraction: number;
	/** Liquid fraction below which the 1/F law is held flat (solidus / eutectic stand-in). */
	solidusLiquidFraction: number;
	/** Sensor mid-point below the free surface of the liquid, m. */
	depthMetre: number;
	/** Gas pressure over the melt, Pa (no effect on triple points). */
	pressurePa: number;
	/** Fraction of (furnace − cell) the sensor sees through stem conduction (immersion error). */
	immersionCouplingFraction: number;

	// lags
	wellTimeConstantS: number;
	thermometerTimeConstantS: number;

	// thermometer and currents
	thermometer: Thermometer;
	lowCurrentMilliAmp: number;
	highCurrentMilliAmp: number;
	highCurrentFirstAtMinutes: number;
	highCurrentEveryMinutes: number;
	highCurrentForMinutes: number;

	// bridge
	resistor: StandardResistor;
	resistorBathCelsius: number;
	resistorBathWanderMilliKelvin: number;
	whiteNoiseMicroKelvin: number;
	correlatedNoiseMicroKelvin: number;
	correlationTimeS: number;
	outlierProbability: number;
	outlierMicroKelvin: number;

	// faults
	faultAtMinutes: number;
	dropoutMinutes: number;
	disconnectSeconds: number;
	driftKelvinPerHour: number;
	/** The over-temperature cut-out holds the runaway furnace this far from the point, K. */
	driftLimitKelvin: number;
	badValueSpacingMinutes: number;
	badValueRepeats: number;
}

/** Overrides: any field, with thermometer and resistor mergeable field by field. */
export type ScenarioOverrides = Partial<Omit<ScenarioParams, 'thermometer' | 'resistor'>> & {
	thermometer?: Partial<Thermometer>;
	resistor?: Partial<StandardResistor>;
};

/** One-line meaning of each parameter (used by the CLI's --help). */
export const PARAM_DOCS: Record<string, string> = {
	point: 'fixed point id (Ar Hg TPW Ga In Sn Zn Al Ag)',
	kind: 'melt | freeze | triple-point',
	fault: 'dropout | disconnect | bad-values | drift | none',
	epochMs: 'simulated clock start: UTC ms or ISO date (default now)',
	readingIntervalS: 'seconds between bridge readings (1–10)',
	durationHours: 'fixed run length in hours (default: until the knee + afterKneeMinutes)',
	afterKneeMinutes: 'minutes to keep reading after the last liquid froze / last solid melted',
	maxDurationHours: 'hard cap on the run length, hours',
	channel: 'bridge channel reported with each reading (0–63)',
	furnaceOffsetKelvin: 'furnace/bath set point minus the fixed point during the plateau, K (<0 freeze, >0 melt)',
	precoolOffsetKelvin: 'freeze: set point offset before nucleation, K',
	startOffsetKelvin: 'sample temperature at t=0 relative to the point, K',
	furnaceRampKelvinPerMinute: 'furnace ramp-rate limit, K/min',
	conductanceWattPerKelvin: 'furnace-to-sample thermal conductance G, W/K',
	sampleMassKg: 'sample mass, kg',
	molarMassGramPerMol: 'molar mass of the substance, g/mol',
	molarHeatCapacityJPerMolKelvin: 'molar heat capacity of the sample, J/(mol K)',
	cellHeatCapacityJPerKelvin: 'heat capacity of crucible and cell parts, J/K',
	initialLiquidFraction: 'triple points: liquid fraction at the start (after the mantle is formed)',
	supercoolKelvin: 'freeze: supercooling at which nucleation is induced, K',
	nucleationAtMinutes: 'freeze: induce nucleation at this minute instead',
	innerInterfaceAfterMinutes: 'minutes after nucleation / melt onset when the inner interface is formed',
	innerInterfaceKickKelvin: 'well disturbance from the cold/warm rod, K',
	insertionOffsetKelvin: 'triple points: SPRT temperature on insertion relative to the cell, K',
	impurityMolFraction: 'total impurity, mol/mol (Raoult, insoluble in the solid)',
	solidusLiquidFraction: 'liquid fraction below which the 1/F curve is held flat',
	depthMetre: 'sensor mid-point depth below the free surface, m',
	pressurePa: 'gas pressure over the melt, Pa',
	immersionCouplingFraction: 'fraction of the furnace-cell difference leaking to the sensor',
	wellTimeConstantS: 'thermometer-well time constant, s',
	thermometerTimeConstantS: 'SPRT time constant in the well, s',
	'thermometer.serial': 'SPRT serial number',
	'thermometer.rTpwOhm': 'SPRT resistance at the triple point of water, ohm',
	'thermometer.subrange': 'ITS-90 sub-range of the SPRT calibration',
	'thermometer.coefficients': 'deviation coefficients as JSON, e.g. {"a":-1.2e-4,"b":-1e-5}',
	'thermometer.selfHeatingMilliKelvinAt1mA': 'self-heating at 1 mA in this cell, mK',
	lowCurrentMilliAmp: 'normal measuring current, mA',
	highCurrentMilliAmp: 'second current for the self-heating check, mA',
	highCurrentFirstAtMinutes: 'first switch to the high current, minutes',
	highCurrentEveryMinutes: 'period of high-current checks, minutes',
	highCurrentForMinutes: 'length of each high-current check, minutes (0 = never)',
	'resistor.calibratedOhm': 'standard resistor certificate value, ohm',
	'resistor.referenceTemperatureCelsius': 'certificate temperature of the resistor, °C',
	'resistor.alphaPerKelvin': 'resistor temperature coefficient α, 1/K',
	'resistor.betaPerKelvin2': 'resistor temperature coefficient β, 1/K²',
	resistorBathCelsius: 'standard resistor bath temperature, °C',
	resistorBathWanderMilliKelvin: 'slow wander of the resistor bath, mK',
	whiteNoiseMicroKelvin: 'white bridge noise, temperature-equivalent µK (1σ)',
	correlatedNoiseMicroKelvin: 'AR(1) noise, µK (1σ)',
	correlationTimeS: 'AR(1) correlation time, s',
	outlierProbability: 'chance of an outlier per reading',
	outlierMicroKelvin: 'typical outlier size, µK',
	faultAtMinutes: 'when the fault starts, minutes from the start',
	dropoutMinutes: 'dropout: minutes without readings',
	disconnectSeconds: 'disconnect: simulated seconds the link stays down',
	driftKelvinPerHour: 'drift: runaway rate of the furnace, K/h',
	driftLimitKelvin: 'drift: runaway stops this far from the point, K',
	badValueSpacingMinutes: 'bad-values: minutes between bad readings',
	badValueRepeats: 'bad-values: how many rounds of NaN/negative/duplicate/out-of-order'
};
