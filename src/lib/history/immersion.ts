// Immersion profile of a fixed-point run: the plateau value at each sensor depth against the hydrostatic
// line of ITS-90 Table 2 (T rises by dT/dl per metre below the free surface). A thermometer that is
// immersed well enough follows the line; heat leaking along its stem pulls the shallow steps off it.
import { fixedPoint, type FixedPointId } from '../metrology/index';

export interface ImmersionStep {
	/** sensor mid-point below the free surface, m */
	depthMetre: number;
	/** plateau value at this depth, K (any common offset cancels: the profile is relative) */
	valueKelvin: number;
	/** standard uncertainty of that value, K (repeatability over the step) */
	uKelvin?: number;
	startMs?: number;
	endMs?: number;
	readings?: number;
}

export interface ImmersionPoint extends ImmersionStep {
	/** raise from the deepest step, m (≥ 0) */
	raiseMetre: number;
	/** measured change from the deepest step, mK */
	measuredMilliKelvin: number;
	/** the hydrostatic line there: dT/dl × (depth − deepest depth), mK */
	expectedMilliKelvin: number;
	/** measured − expected, mK */
	residualMilliKelvin: number;
	within: boolean;
}

export interface ImmersionProfile {
	point: FixedPointId;
	/** ITS-90 Table 2, mK per metre */
	dTdlMilliKelvinPerMetre: number;
	toleranceMilliKelvin: number;
	referenceDepthMetre: number;
	points: ImmersionPoint[];
	/** every step within the tolerance of the line */
	follows: boolean;
	/** the shallowest depth from which every deeper step is within the tolerance, m */
	adequateFromDepthMetre: number | null;
	maxResidualMilliKelvin: number;
}

export const DEFAULT_IMMERSION_TOLERANCE_MILLIKELVIN = 0.1;

/** The hydrostatic line, mK, relative to the reference depth: dT/dl × (depth − reference). */
export function hydrostaticLineMilliKelvin(point: FixedPointId, depthMetre: number, referenceDepthMetre: number): number {
	return fixedPoint(point).dTdl * (depthMetre - referenceDepthMetre) * 1000;
}

export function immersionProfile(point: FixedPointId, steps: ImmersionStep[], toleranceMilliKelvin = DEFAULT_IMMERSION_TOLERANCE_MILLIKELVIN): ImmersionProfile | null {
	if (steps.length === 0) return null;
	const fp = fixedPoint(point);
	const sorted = [...steps].sort((a, b) => b.depthMetre - a.depthMetre);
	const ref = sorted[0];
	const points = sorted.map((s) => {
		const measured = (s.valueKelvin - ref.valueKelvin) * 1000;
		const expected = hydrostaticLineMilliKelvin(point, s.depthMetre, ref.depthMetre);
		const residual = measured - expected;
		return { ...s, raiseMetre: ref.depthMetre - s.depthMetre, measuredMilliKelvin: measured, expectedMilliKelvin: expected, residualMilliKelvin: residual, within: Math.abs(residual) <= toleranceMilliKelvin };
	});
	let adequate: number | null = null;
	for (const p of points) {
		if (!p.within) break;
		adequate = p.depthMetre;
	}
	return {
		point,
		dTdlMilliKelvinPerMetre: fp.dTdl * 1000,
		toleranceMilliKelvin,
		referenceDepthMetre: ref.depthMetre,
		points,
		follows: points.every((p) => p.within),
		adequateFromDepthMetre: adequate,
		maxResidualMilliKelvin: Math.max(...points.map((p) => Math.abs(p.residualMilliKelvin)))
	};
}
