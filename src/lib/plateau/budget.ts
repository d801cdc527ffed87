/**
 * Uncertainty budget of one plateau value, in mK, combined by the metrology core (GUM). Each line
 * says where its number comes from.
 */
import { combineBudget, fixedPoint, omeDepressionKelvin, type Budget, type FixedPointId, type UncertaintyComponent } from '../metrology/index';
import type { LineFit } from './stats';

export interface BudgetLineSource {
	name: string;
	source: string;
}

export interface PlateauBudget extends Budget {
	sources: BudgetLineSource[];
}

export interface BudgetInput {
	point: FixedPointId;
	fit: LineFit;
	windowS: number;
	selfHeating: { kStdErrMilliKelvinPerMilliAmp2: number } | null;
	meanSquareCurrent: number | null;
	depthMetre?: number;
	depthHalfWidthMetre: number;
	pressurePa?: number;
	pressureHalfWidthPa: number;
	impurityMolFraction: number | null;
	impuritySource: string;
}

export function buildBudget(b: BudgetInput): PlateauBudget {
	const fp = fixedPoint(b.point);
	const lines: (UncertaintyComponent & { source: string })[] = [];
	lines.push({
		name: 'repeatability (plateau mean)',
		source: 'standard error of the mean over the slope window, block-averaged for serial correlation',
		value: b.fit.meanStdErr * 1000,
		unit: 'mK',
		distribution: 'normal',
		degreesOfFreedom: Math.max(b.fit.n / b.fit.inflation - 2, 1)
	});
	lines.push({
		name: 'plateau slope over the window',
		// common practice: the drift across the averaging window, taken as a rectangular half-width
		source: 'fitted slope × window length / 2',
		value: (Math.abs(b.fit.slope) * b.windowS * 1000) / 2,
		unit: 'mK',
		distribution: 'rectangular'
	});
	if (b.selfHeating && b.meanSquareCurrent !== null && Number.isFinite(b.meanSquareCurrent)) {
		lines.push({
			name: 'self-heating extrapolation to zero current',
			source: 'u(k) of the I² coefficient from the current steps on the plateau × mean I²',
			value: b.selfHeating.kStdErrMilliKelvinPerMilliAmp2 * b.meanSquareCurrent,
			unit: 'mK',
			distribution: 'normal'
		});
	}
	if (b.depthMetre !== undefined) {
		lines.push({
			name: 'hydrostatic-head correction',
			source: `ITS-90 Table 2 dT/dl × depth half-width ${b.depthHalfWidthMetre} m`,
			value: Math.abs(fp.dTdl) * b.depthHalfWidthMetre * 1000,
			unit: 'mK',
			distribution: 'rectangular'
		});
	}
	if (b.pressurePa !== undefined && fp.state !== 'triple') {
		lines.push({
			name: 'pressure correction',
			source: `ITS-90 Table 2 dT/dp × pressure half-width ${b.pressureHalfWidthPa} Pa`,
			value: Math.abs(fp.dTdp) * b.pressureHalfWidthPa * 1000,
			unit: 'mK',
			distribution: 'rectangular'
		});
	}
	if (b.impurityMolFraction !== null && b.impurityMolFraction > 0) {
		lines.push({
			name: 'impurities (OME)',
			source: `overall maximum estimate c/A from the ${b.impuritySource}, as a rectangular half-width`,
			value: omeDepressionKelvin(b.point, b.impurityMolFraction) * 1000,
			unit: 'mK',
			distribution: 'rectangular'
		});
	}
	const budget = combineBudget(
		lines.map(({ source: _s, ...c }) => c),
		'mK',
		2
	);
	return { ...budget, sources: lines.map((l) => ({ name: l.name, source: l.source })) };
}
