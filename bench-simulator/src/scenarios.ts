// Named realizations. All numbers here are invented demo values of a plausible order (common
// practice), except what comes from the metrology core (T90, L, dT/dl, dT/dp, A) and the molar
// masses (standard atomic weights, from memory). See README.md.

import { fixedPoint, type FixedPointId, type RealizationKind, type StandardResistor, type SubrangeId } from '../../src/lib/metrology/index';
import type { FaultKind, ScenarioOverrides, ScenarioParams } from './params';
import { completeCoefficients, type Thermometer } from './thermometer';

interface PointDefaults {
	molarMassGramPerMol: number; // standard atomic weight (memory)
	molarHeatCapacityJPerMolKelvin: number; // ≈ 3R for metals (Dulong–Petit); liquids from memory
	sampleMassKg: number;
	/** |furnace offset| of the plateau, K */
	offsetKelvin: number;
	/** default plateau length that fixes G = m L / (hours × |offset|) */
	plateauHours: number;
	precoolKelvin: number;
	supercoolKelvin: number;
	depthMetre: number;
	impurityMolFraction: number;
	selfHeatingMilliKelvinAt1mA: number;
	subrange: SubrangeId;
	serial: string;
	rTpwOhm: number;
	resistorOhm: 25 | 100;
	initialLiquidFraction: number;
}

const COEFFICIENTS: Record<SubrangeId, { a: number; b?: number; c?: number; d?: number }> = {
	'Ar-Hg-TPW': { a: -1.08e-4, b: -7.9e-6 },
	'Hg-TPW-Ga': { a: -1.17e-4, b: 9.4e-6 },
	'TPW-Ga': { a: -1.15e-4 },
	'TPW-In': { a: -1.21e-4 },
	'TPW-In-Sn': { a: -1.24e-4, b: -9.1e-6 },
	'TPW-Sn-Zn': { a: -1.2134e-4, b: -9.919e-6 },
	'TPW-Sn-Zn-Al': { a: -1.19e-4, b: -1.02e-5, c: 1.6e-6 },
	'TPW-Sn-Zn-Al-Ag': { a: -1.31e-4, b: -1.08e-5, c: 2.1e-6, d: 1.2e-5 }
};

const R = 8.314462618;

// prettier-ignore
const POINTS: Record<FixedPointId, PointDefaults> = {
	Ar: { molarMassGramPerMol: 39.948, molarHeatCapacityJPerMolKelvin: 42, sampleMassKg: 0.08, offsetKelvin: 0.02, plateauHours: 10, precoolKelvin: 0, supercoolKelvin: 0, depthMetre: 0.05, impurityMolFraction: 1e-6, selfHeatingMilliKelvinAt1mA: 0.45, subrange: 'Ar-Hg-TPW', serial: 'SP-L1207', rTpwOhm: 25.50713, resistorOhm: 25, initialLiquidFraction: 0.1 },
	Hg: { molarMassGramPerMol: 200.59, molarHeatCapacityJPerMolKelvin: 28, sampleMassKg: 2.5, offsetKelvin: 0.03, plateauHours: 12, precoolKelvin: 0, supercoolKelvin: 0, depthMetre: 0.15, impurityMolFraction: 1e-7, selfHeatingMilliKelvinAt1mA: 0.7, subrange: 'Ar-Hg-TPW', serial: 'SP-L1207', rTpwOhm: 25.50713, resistorOhm: 25, initialLiquidFraction: 0.1 },
	TPW: { molarMassGramPerMol: 18.015, molarHeatCapacityJPerMolKelvin: 75.3, sampleMassKg: 0.9, offsetKelvin: -0.008, plateauHours: 2000, precoolKelvin: 0, supercoolKelvin: 0, depthMetre: 0.25, impurityMolFraction: 2e-8, selfHeatingMilliKelvinAt1mA: 0.62, subrange: 'Ar-Hg-TPW', serial: 'SP-L1207', rTpwOhm: 25.50713, resistorOhm: 25, initialLiquidFraction: 0.75 },
	Ga: { molarMassGramPerMol: 69.723, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 1.0, offsetKelvin: 0.5, plateauHours: 12, precoolKelvin: 0, supercoolKelvin: 0, depthMetre: 0.15, impurityMolFraction: 1e-7, selfHeatingMilliKelvinAt1mA: 0.8, subrange: 'Hg-TPW-Ga', serial: 'SP-M0342', rTpwOhm: 25.48861, resistorOhm: 25, initialLiquidFraction: 0 },
	In: { molarMassGramPerMol: 114.818, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 1.0, offsetKelvin: 0.5, plateauHours: 8, precoolKelvin: 1.0, supercoolKelvin: 0.6, depthMetre: 0.18, impurityMolFraction: 2e-7, selfHeatingMilliKelvinAt1mA: 0.9, subrange: 'TPW-In-Sn', serial: 'SP-H2218', rTpwOhm: 25.53402, resistorOhm: 25, initialLiquidFraction: 0 },
	Sn: { molarMassGramPerMol: 118.71, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 1.0, offsetKelvin: 0.5, plateauHours: 8, precoolKelvin: 4.0, supercoolKelvin: 3.0, depthMetre: 0.18, impurityMolFraction: 2e-7, selfHeatingMilliKelvinAt1mA: 1.0, subrange: 'TPW-Sn-Zn-Al', serial: 'SP-H2219', rTpwOhm: 25.49127, resistorOhm: 25, initialLiquidFraction: 0 },
	Zn: { molarMassGramPerMol: 65.38, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 1.2, offsetKelvin: 1.0, plateauHours: 10, precoolKelvin: 1.5, supercoolKelvin: 0.7, depthMetre: 0.18, impurityMolFraction: 2e-7, selfHeatingMilliKelvinAt1mA: 1.1, subrange: 'TPW-Sn-Zn-Al', serial: 'SP-H2219', rTpwOhm: 25.49127, resistorOhm: 25, initialLiquidFraction: 0 },
	Al: { molarMassGramPerMol: 26.9815, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 0.3, offsetKelvin: 1.5, plateauHours: 8, precoolKelvin: 2.5, supercoolKelvin: 1.2, depthMetre: 0.18, impurityMolFraction: 3e-7, selfHeatingMilliKelvinAt1mA: 1.2, subrange: 'TPW-Sn-Zn-Al', serial: 'SP-H2219', rTpwOhm: 25.49127, resistorOhm: 100, initialLiquidFraction: 0 },
	Ag: { molarMassGramPerMol: 107.8682, molarHeatCapacityJPerMolKelvin: 3 * R, sampleMassKg: 1.2, offsetKelvin: 1.5, plateauHours: 6, precoolKelvin: 2.5, supercoolKelvin: 1.5, depthMetre: 0.18, impurityMolFraction: 3e-7, selfHeatingMilliKelvinAt1mA: 1.4, subrange: 'TPW-Sn-Zn-Al-Ag', serial: 'SP-X0915', rTpwOhm: 25.51876, resistorOhm: 100, initialLiquidFraction: 0 }
};

function resistorFor(ohm: 25 | 100): StandardResistor {
	// invented certificate values of a plausible order for thermostatted AC/DC standards
	return ohm === 25
		? { calibratedOhm: 25.0001374, referenceTemperatureCelsius: 23, alphaPerKelvin: 2.1e-6, betaPerKelvin2: -3.2e-8 }
		: { calibratedOhm: 100.000512, referenceTemperatureCelsius: 23, alphaPerKelvin: 1.6e-6, betaPerKelvin2: -2.7e-8 };
}

/** Defaults for one point and kind, before scenario tweaks and caller overrides. */
export function baseParams(point: FixedPointId, kind: RealizationKind): ScenarioParams {
	const p = POINTS[point];
	const fp = fixedPoint(point);
	const sign = kind === 'freeze' ? -1 : kind === 'melt' ? 1 : Math.sign(p.offsetKelvin) || 1;
	const offset = sign * Math.abs(p.offsetKelvin);
	const latentJ = ((p.sampleMassKg * 1000) / p.molarMassGramPerMol) * fp.enthalpyOfFusionJPerMol;
	const thermometer: Thermometer = {
		serial: p.serial,
		rTpwOhm: p.rTpwOhm,
		subrange: p.subrange,
		coefficients: completeCoefficients(p.subrange, COEFFICIENTS[p.subrange]),
		selfHeatingMilliKelvinAt1mA: p.selfHeatingMilliKelvinAt1mA
	};
	return {
		point,
		kind,
		fault: null,
		epochMs: Date.now(),
		readingIntervalS: 2,
		durationHours: kind === 'triple-point' ? 8 : null,
		afterKneeMinutes: 30,
		maxDurationHours: 72,
		channel: 1,
		furnaceOffsetKelvin: offset,
		precoolOffsetKelvin: kind === 'freeze' ? -Math.max(p.precoolKelvin, Math.abs(offset)) : null,
		startOffsetKelvin: kind === 'freeze' ? 0.3 : kind === 'melt' ? -0.5 : 0,
		furnaceRampKelvinPerMinute: 0.2,
		conductanceWattPerKelvin: latentJ / (p.plateauHours * 3600 * Math.abs(p.offsetKelvin)),
		sampleMassKg: p.sampleMassKg,
		molarMassGramPerMol: p.molarMassGramPerMol,
		molarHeatCapacityJPerMolKelvin: p.molarHeatCapacityJPerMolKelvin,
		cellHeatCapacityJPerKelvin: 400,
		initialLiquidFraction: kind === 'triple-point' ? p.initialLiquidFraction : kind === 'freeze' ? 1 : 0,
		supercoolKelvin: p.supercoolKelvin,
		nucleationAtMinutes: null,
		innerInterfaceAfterMinutes: kind === 'triple-point' ? null : 5,
		innerInterfaceKickKelvin: kind === 'freeze' ? 0.8 : 0.4,
		insertionOffsetKelvin: -0.05,
		impurityMolFraction: p.impurityMolFraction,
		solidusLiquidFraction: 0.02,
		depthMetre: p.depthMetre,
		pressurePa: 101325,
		immersionCouplingFraction: 2e-5,
		wellTimeConstantS: 60,
		thermometerTimeConstantS: 15,
		thermometer,
		lowCurrentMilliAmp: 1,
		highCurrentMilliAmp: 1.414,
		highCurrentFirstAtMinutes: 60,
		highCurrentEveryMinutes: 90,
		highCurrentForMinutes: 6,
		resistor: resistorFor(p.resistorOhm),
		resistorBathCelsius: 23.02,
		resistorBathWanderMilliKelvin: 1,
		whiteNoiseMicroKelvin: 25,
		correlatedNoiseMicroKelvin: 15,
		correlationTimeS: 600,
		outlierProbability: 2e-4,
		outlierMicroKelvin: 800,
		faultAtMinutes: 120,
		dropoutMinutes: 20,
		disconnectSeconds: 300,
		driftKelvinPerHour: 30,
		driftLimitKelvin: 3,
		badValueSpacingMinutes: 2,
		badValueRepeats: 2
	};
}

export interface ScenarioInfo {
	name: string;
	description: string;
	point: FixedPointId;
	kind: RealizationKind;
	fault?: FaultKind;
	tweaks?: ScenarioOverrides;
}

const plain = (point: FixedPointId, kind: RealizationKind, description: string): ScenarioInfo => ({
	name: `${point.toLowerCase()}-${kind}`,
	description,
	point,
	kind
});

export const SCENARIOS: readonly ScenarioInfo[] = [
	plain('Ar', 'triple-point', 'Argon triple point in a cryostat, melted slowly from an inner melt; 8 h of a ~10 h plateau.'),
	plain('Hg', 'triple-point', 'Mercury triple point in a stirred bath 30 mK above, inner melt formed; 8 h of a ~12 h plateau.'),
	plain('TPW', 'triple-point', 'Triple point of water, ice mantle and inner melt formed, maintenance bath 8 mK below; 8 h, very flat.'),
	plain('Ga', 'melt', 'Gallium melt, bath 0.5 K above, inner melt 5 min after onset; ~12 h plateau.'),
	plain('In', 'freeze', 'Indium freeze, furnace 0.5 K below, ~8 h plateau.'),
	plain('In', 'melt', 'Indium melt, furnace 0.5 K above, ~8 h plateau.'),
	plain('Sn', 'freeze', 'Tin freeze with deep supercooling (3 K here) and recalescence, furnace 0.5 K below, ~8 h plateau.'),
	plain('Sn', 'melt', 'Tin melt, furnace 0.5 K above, ~8 h plateau.'),
	plain('Zn', 'freeze', 'Zinc freeze, furnace 1 K below, ~10 h plateau.'),
	plain('Zn', 'melt', 'Zinc melt, furnace 1 K above, ~10 h plateau.'),
	plain('Al', 'freeze', 'Aluminium freeze, furnace 1.5 K below, ~8 h plateau, 100 ohm standard resistor.'),
	plain('Al', 'melt', 'Aluminium melt, furnace 1.5 K above, ~8 h plateau.'),
	plain('Ag', 'freeze', 'Silver freeze, furnace 1.5 K below, ~6 h plateau, 100 ohm standard resistor.'),
	plain('Ag', 'melt', 'Silver melt, furnace 1.5 K above, ~6 h plateau.'),
	{
		name: 'sn-freeze-impure',
		description: 'Tin freeze of a poorer sample (5 µmol/mol): clear Raoult 1/F slope and a rounded knee.',
		point: 'Sn',
		kind: 'freeze',
		tweaks: { impurityMolFraction: 5e-6 }
	},
	{
		name: 'quick-in-freeze',
		description: 'Indium freeze with a 40 min plateau and 1 s readings: short runs for tests and demos.',
		point: 'In',
		kind: 'freeze',
		tweaks: { conductanceWattPerKelvin: 24, readingIntervalS: 1, afterKneeMinutes: 10, highCurrentFirstAtMinutes: 20, highCurrentEveryMinutes: 30, highCurrentForMinutes: 4, faultAtMinutes: 25 }
	},
	{
		name: 'zn-freeze-dropout',
		description: 'Zinc freeze; the bridge falls silent for 20 min at 2 h (silence alert).',
		point: 'Zn',
		kind: 'freeze',
		fault: 'dropout'
	},
	{
		name: 'zn-freeze-disconnect',
		description: 'Zinc freeze; the network link drops for 5 simulated minutes at 2 h, then the client resumes.',
		point: 'Zn',
		kind: 'freeze',
		fault: 'disconnect'
	},
	{
		name: 'in-freeze-bad-values',
		description: 'Indium freeze with bad readings from 2 h: NaN, negative ratio, duplicated seq, time going backwards.',
		point: 'In',
		kind: 'freeze',
		fault: 'bad-values'
	},
	{
		name: 'zn-freeze-drift',
		description: 'Zinc freeze; furnace control is lost at 2 h and it runs away upward (drift alert), cut-out at +3 K.',
		point: 'Zn',
		kind: 'freeze',
		fault: 'drift',
		tweaks: { immersionCouplingFraction: 1e-4 }
	},
	{
		name: 'tpw-triple-point-drift',
		description: 'Triple point of water; the maintenance bath controller fails at 2 h and warms at 2 K/h (mantle melts, drift).',
		point: 'TPW',
		kind: 'triple-point',
		fault: 'drift',
		tweaks: { driftKelvinPerHour: 2, driftLimitKelvin: 2, immersionCouplingFraction: 1e-4, durationHours: 10 }
	}
];

export function findScenario(name: string): ScenarioInfo {
	const s = SCENARIOS.find((x) => x.name === name);
	if (!s) throw new Error(`unknown scenario '${name}'; known: ${SCENARIOS.map((x) => x.name).join(', ')}`);
	return s;
}

/** Scenario defaults, then the scenario's own tweaks, then the caller's overrides. */
export function resolveParams(name: string, overrides: ScenarioOverrides = {}): ScenarioParams {
	const s = findScenario(name);
	const base = baseParams(overrides.point ?? s.point, overrides.kind ?? s.kind);
	base.fault = s.fault ?? null;
	return mergeParams(mergeParams(base, s.tweaks ?? {}), overrides);
}

export function mergeParams(base: ScenarioParams, o: ScenarioOverrides): ScenarioParams {
	const out: ScenarioParams = { ...base, ...(o as Partial<ScenarioParams>) };
	out.thermometer = { ...base.thermometer, ...(o.thermometer ?? {}) };
	if (o.thermometer?.coefficients || o.thermometer?.subrange) {
		out.thermometer.coefficients = completeCoefficients(out.thermometer.subrange, out.thermometer.coefficients);
	}
	out.resistor = { ...base.resistor, ...(o.resistor ?? {}) };
	return out;
}
