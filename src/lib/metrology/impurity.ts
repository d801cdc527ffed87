// Impurity effects on freezing and melting points, from the first cryoscopic constant A = L/(R T²)
// (fixed-points.ts). Raoult's law for an impurity insoluble in the solid: ΔT = (c/A)/F, F the liquid
// fraction; the overall maximum estimate (OME) takes the depression as c/A.

import { MetrologyError, requireFinite, requireNonNegative } from './errors';
import { fixedPoint } from './fixed-points';
import type { FixedPointId } from './types';

function checkFraction(c: number, where: string): void {
	requireNonNegative(c, 'impurity mole fraction', where);
	if (c > 0.01) {
		// Dilute-solution laws fail long before 1 %; larger values are usually ppm passed as mol/mol.
		throw new MetrologyError('out_of_range', `${where}: impurity ${c} mol/mol is beyond the dilute limit (max 0.01); pass mol/mol, e.g. 1e-6`, { where, impurityMolFraction: c });
	}
}

/** Raoult depression below the pure-metal temperature, kelvin, at liquid fraction F (0 < F ≤ 1). */
export function raoultDepressionKelvin(point: FixedPointId, impurityMolFraction: number, liquidFraction: number): number {
	const where = 'raoultDepressionKelvin';
	const a = fixedPoint(point).cryoscopicConstantPerKelvin;
	checkFraction(impurityMolFraction, where);
	requireFinite(liquidFraction, 'liquid fraction F', where);
	if (!(liquidFraction > 0 && liquidFraction <= 1)) {
		throw new MetrologyError('out_of_range', `${where}: liquid fraction F must be in (0, 1], got ${liquidFraction}`, { where, liquidFraction });
	}
	return impurityMolFraction / a / liquidFraction;
}

/** OME depression c/A in kelvin (the liquidus depression, F = 1). */
export function omeDepressionKelvin(point: FixedPointId, impurityMolFraction: number): number {
	const where = 'omeDepressionKelvin';
	const a = fixedPoint(point).cryoscopicConstantPerKelvin;
	checkFraction(impurityMolFraction, where);
	return impurityMolFraction / a;
}

/** Inverse of the OME: total impurity mol/mol from a depression in kelvin, c = A ΔT. */
export function impurityFromDepressionKelvin(point: FixedPointId, depressionKelvin: number): number {
	const where = 'impurityFromDepressionKelvin';
	const a = fixedPoint(point).cryoscopicConstantPerKelvin;
	requireNonNegative(depressionKelvin, 'depression (K)', where);
	return a * depressionKelvin;
}

/**
 * Impurity from the slope of T against 1/F (kelvin per unit 1/F): by Raoult the slope is −c/A, so
 * c = −A × slope. A rising T vs 1/F (positive slope) is not Raoult behaviour and is rejected.
 */
export function impurityFromInverseFractionSlope(point: FixedPointId, slopeKelvin: number): number {
	const where = 'impurityFromInverseFractionSlope';
	const a = fixedPoint(point).cryoscopicConstantPerKelvin;
	requireFinite(slopeKelvin, 'slope of T vs 1/F (K)', where);
	if (slopeKelvin > 0) {
		throw new MetrologyError('invalid_input', `${where}: a positive slope of T vs 1/F (${slopeKelvin} K) does not follow Raoult's law`, { where, slopeKelvin });
	}
	return -a * slopeKelvin;
}

/** OME depression per µmol/mol of impurity, mK: 1e-6/A × 1000. */
export function milliKelvinPerMicroMolPerMol(point: FixedPointId): number {
	return (1e-6 / fixedPoint(point).cryoscopicConstantPerKelvin) * 1000;
}

/** Nominal purity in percent to total impurity mole fraction: 99.9999 % -> 1e-6 (common practice). */
export function purityToImpurityMolFraction(purityPercent: number): number {
	const where = 'purityToImpurityMolFraction';
	requireFinite(purityPercent, 'purity (%)', where);
	if (purityPercent < 0 || purityPercent > 100) {
		throw new MetrologyError('out_of_range', `${where}: purity must be within 0 % to 100 %, got ${purityPercent}`, { where, purityPercent });
	}
	return (100 - purityPercent) / 100;
}
