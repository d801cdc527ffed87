// Public API of the metrology core: pure functions, no I/O, loads in browser, server and tsx scripts.

export type {
	FixedPointId,
	SubrangeId,
	FixedPointState,
	RealizationKind,
	FixedPoint,
	DeviationCoefficients,
	StandardResistor,
	Subrange
} from './types';
export { MetrologyError, type MetrologyErrorCode } from './errors';
export { FIXED_POINT_IDS, GAS_CONSTANT_J_PER_MOL_K, STANDARD_PRESSURE_PA, fixedPoint, allFixedPoints, isFixedPointId } from './fixed-points';
export {
	referenceRatio,
	referenceRatioDerivative,
	referenceTemperature,
	referenceRatioEq9a,
	referenceRatioEq10a,
	referenceTemperatureEq9b,
	referenceTemperatureEq10b,
	EQ9_MIN_KELVIN,
	EQ10_MAX_KELVIN,
	REFERENCE_MIN_KELVIN,
	REFERENCE_MAX_KELVIN
} from './reference-function';
export {
	SUBRANGE_IDS,
	SUBRANGE_MARGIN_KELVIN,
	subrange,
	deviation,
	deviationSlope,
	fitDeviation,
	temperatureFromRatio,
	prepareDeviation,
	temperatureFromPreparedRatio,
	type PreparedDeviation,
	ratioFromTemperature,
	dTdW,
	withAluminiumRatio
} from './deviation';
export { resistanceFromBridgeRatio, standardResistorOhm, ratioSensitivityKelvin } from './bridge';
export { reduceReading, rTpwNearestInTime, type ReadingInput, type ReducedReading } from './reduction';
export { zeroCurrentResistance, zeroCurrentFit, selfHeatingKelvin, type ZeroCurrentFit } from './self-heating';
export { hydrostaticCorrectionKelvin, pressureCorrectionKelvin, expectedSensorKelvin, type CellConditions } from './corrections';
export {
	raoultDepressionKelvin,
	omeDepressionKelvin,
	impurityFromDepressionKelvin,
	impurityFromInverseFractionSlope,
	milliKelvinPerMicroMolPerMol,
	purityToImpurityMolFraction
} from './impurity';
export { combineBudget, type Distribution, type UncertaintyComponent, type BudgetLine, type Budget } from './uncertainty';
export { studentCoverageFactor } from './student-t';
export { solveLinearSystem } from './linear-algebra';
export { EQUATIONS, type EquationEntry, type Provenance } from './equations';
