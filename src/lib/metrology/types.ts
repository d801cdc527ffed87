// Shared types of the metrology core. Temperatures in kelvin unless a name says otherwise.

export type FixedPointId = 'Ar' | 'Hg' | 'TPW' | 'Ga' | 'In' | 'Sn' | 'Zn' | 'Al' | 'Ag';

export type SubrangeId =
	| 'Ar-Hg-TPW'
	| 'Hg-TPW-Ga'
	| 'TPW-Ga'
	| 'TPW-In'
	| 'TPW-In-Sn'
	| 'TPW-Sn-Zn'
	| 'TPW-Sn-Zn-Al'
	| 'TPW-Sn-Zn-Al-Ag';

export type FixedPointState = 'triple' | 'melting' | 'freezing';

export type RealizationKind = 'melt' | 'freeze' | 'triple-point';

export interface FixedPoint {
	id: FixedPointId;
	/** e.g. 'Triple point of mercury' */
	name: string;
	substance: string;
	state: FixedPointState;
	/** assigned value, K */
	t90: number;
	/** assigned value, °C */
	t90Celsius: number;
	/** W_r(T90) as printed in ITS-90 Table 1 */
	wr: number;
	/** pressure coefficient, K/Pa (ITS-90 Table 2) */
	dTdp: number;
	/** hydrostatic-head coefficient, K per metre of liquid (ITS-90 Table 2) */
	dTdl: number;
	enthalpyOfFusionJPerMol: number;
	/** first cryoscopic constant A = L/(R T^2), 1/K */
	cryoscopicConstantPerKelvin: number;
	/** how the point is usually realised in a cell (common practice) */
	usualKinds: RealizationKind[];
	/** where the enthalpy of fusion comes from; 'memory' marks a value not read in a stored source */
	enthalpySource: string;
}

/** Deviation-function coefficients; which ones are used depends on the sub-range. */
export interface DeviationCoefficients {
	a: number;
	b?: number;
	c?: number;
	d?: number;
	/** the thermometer's own W at the aluminium point (needed by 'TPW-Sn-Zn-Al-Ag') */
	wAl?: number;
}

export interface StandardResistor {
	calibratedOhm: number;
	referenceTemperatureCelsius: number;
	alphaPerKelvin: number;
	betaPerKelvin2: number;
}

export interface Subrange {
	id: SubrangeId;
	points: FixedPointId[];
	minKelvin: number;
	maxKelvin: number;
	/** coefficient names the sub-range uses, e.g. ['a', 'b'] */
	terms: string[];
}
