// Fixed points of ITS-90 used with SPRTs, with the data a laboratory needs around them.
// T90, t90 and W_r: ITS-90 Table 1; dT/dp and dT/dl: ITS-90 Table 2
// (H. Preston-Thomas, Metrologia 27, 3-10 (1990), erratum p. 107).
// Enthalpies of fusion: CRC Handbook of Chemistry and Physics, 95th ed. (2014), "Heat of fusion",
// except argon (memory).

import { MetrologyError } from './errors';
import type { FixedPoint, FixedPointId, FixedPointState, RealizationKind } from './types';

/** Molar gas constant, J/(mol K): CODATA exact value (SI 2019). */
export const GAS_CONSTANT_J_PER_MOL_K = 8.314462618;

/** Standard atmosphere, Pa: the pressure at which ITS-90 assigns melting and freezing points. */
export const STANDARD_PRESSURE_PA = 101325;

export const FIXED_POINT_IDS: readonly FixedPointId[] = Object.freeze([
	'Ar',
	'Hg',
	'TPW',
	'Ga',
	'In',
	'Sn',
	'Zn',
	'Al',
	'Ag'
] as FixedPointId[]);

interface Row {
	id: FixedPointId;
	name: string;
	substance: string;
	state: FixedPointState;
	t90: number;
	t90Celsius: number;
	wr: number;
	/** Table 2, in 1e-8 K/Pa */
	dTdpE8: number;
	/** Table 2, in mK/m */
	dTdlMilliKelvinPerMetre: number;
	enthalpyKiloJoulePerMol: number;
	enthalpySource: string;
	usualKinds: RealizationKind[];
}

const CRC = 'CRC Handbook of Chemistry and Physics, 95th ed. (2014), "Heat of fusion"';

// usualKinds is common practice (no single source): metal points are realised as freezes (the defining
// state for In..Ag) and also melted; Ga is a melting point; Ar and Hg cells are usually melted
// (Hg is also frozen); the TPW is realised with an ice mantle.
const ROWS: Row[] = [
	{ id: 'Ar', name: 'Triple point of argon', substance: 'argon', state: 'triple', t90: 83.8058, t90Celsius: -189.3442, wr: 0.21585975, dTdpE8: 25, dTdlMilliKelvinPerMetre: 3.3, enthalpyKiloJoulePerMol: 1.18, enthalpySource: 'memory (not in the stored reference table)', usualKinds: ['melt', 'triple-point'] },
	{ id: 'Hg', name: 'Triple point of mercury', substance: 'mercury', state: 'triple', t90: 234.3156, t90Celsius: -38.8344, wr: 0.84414211, dTdpE8: 5.4, dTdlMilliKelvinPerMetre: 7.1, enthalpyKiloJoulePerMol: 2.295, enthalpySource: CRC, usualKinds: ['melt', 'freeze'] },
	{ id: 'TPW', name: 'Triple point of water', substance: 'water', state: 'triple', t90: 273.16, t90Celsius: 0.01, wr: 1.0, dTdpE8: -7.5, dTdlMilliKelvinPerMetre: -0.73, enthalpyKiloJoulePerMol: 6.01, enthalpySource: CRC, usualKinds: ['triple-point'] },
	{ id: 'Ga', name: 'Melting point of gallium', substance: 'gallium', state: 'melting', t90: 302.9146, t90Celsius: 29.7646, wr: 1.11813889, dTdpE8: -2.0, dTdlMilliKelvinPerMetre: -1.2, enthalpyKiloJoulePerMol: 5.585, enthalpySource: CRC, usualKinds: ['melt'] },
	{ id: 'In', name: 'Freezing point of indium', substance: 'indium', state: 'freezing', t90: 429.7485, t90Celsius: 156.5985, wr: 1.60980185, dTdpE8: 4.9, dTdlMilliKelvinPerMetre: 3.3, enthalpyKiloJoulePerMol: 3.291, enthalpySource: CRC, usualKinds: ['freeze', 'melt'] },
	{ id: 'Sn', name: 'Freezing point of tin', substance: 'tin', state: 'freezing', t90: 505.078, t90Celsius: 231.928, wr: 1.89279768, dTdpE8: 3.3, dTdlMilliKelvinPerMetre: 2.2, enthalpyKiloJoulePerMol: 7.15, enthalpySource: CRC, usualKinds: ['freeze', 'melt'] },
	{ id: 'Zn', name: 'Freezing point of zinc', substance: 'zinc', state: 'freezing', t90: 692.677, t90Celsius: 419.527, wr: 2.5689173, dTdpE8: 4.3, dTdlMilliKelvinPerMetre: 2.7, enthalpyKiloJoulePerMol: 7.068, enthalpySource: CRC, usualKinds: ['freeze', 'melt'] },
	{ id: 'Al', name: 'Freezing point of aluminium', substance: 'aluminium', state: 'freezing', t90: 933.473, t90Celsius: 660.323, wr: 3.3760086, dTdpE8: 7.0, dTdlMilliKelvinPerMetre: 1.6, enthalpyKiloJoulePerMol: 10.71, enthalpySource: CRC, usualKinds: ['freeze', 'melt'] },
	{ id: 'Ag', name: 'Freezing point of silver', substance: 'silver', state: 'freezing', t90: 1234.93, t90Celsius: 961.78, wr: 4.28642053, dTdpE8: 6.0, dTdlMilliKelvinPerMetre: 5.4, enthalpyKiloJoulePerMol: 11.3, enthalpySource: CRC, usualKinds: ['freeze', 'melt'] }
];

function build(row: Row): FixedPoint {
	const enthalpyOfFusionJPerMol = row.enthalpyKiloJoulePerMol * 1000;
	return Object.freeze({
		id: row.id,
		name: row.name,
		substance: row.substance,
		state: row.state,
		t90: row.t90,
		t90Celsius: row.t90Celsius,
		wr: row.wr,
		dTdp: row.dTdpE8 * 1e-8,
		dTdl: row.dTdlMilliKelvinPerMetre * 1e-3,
		enthalpyOfFusionJPerMol,
		// A = L/(R T^2): the first cryoscopic constant, used by the Raoult and OME estimates.
		cryoscopicConstantPerKelvin: enthalpyOfFusionJPerMol / (GAS_CONSTANT_J_PER_MOL_K * row.t90 * row.t90),
		usualKinds: Object.freeze([...row.usualKinds]) as RealizationKind[],
		enthalpySource: row.enthalpySource
	});
}

const TABLE: ReadonlyMap<FixedPointId, FixedPoint> = new Map(ROWS.map((r) => [r.id, build(r)]));

export function isFixedPointId(id: unknown): id is FixedPointId {
	return typeof id === 'string' && TABLE.has(id as FixedPointId);
}

/** The fixed point's data; throws unknown_id for anything not in FIXED_POINT_IDS. */
export function fixedPoint(id: FixedPointId): FixedPoint {
	const fp = TABLE.get(id);
	if (!fp) {
		throw new MetrologyError('unknown_id', `fixedPoint: unknown fixed point id '${String(id)}' (expected one of ${FIXED_POINT_IDS.join(', ')})`, { id });
	}
	return fp;
}

export function allFixedPoints(): FixedPoint[] {
	return FIXED_POINT_IDS.map((id) => fixedPoint(id));
}
