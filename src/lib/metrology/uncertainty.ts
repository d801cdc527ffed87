// GUM uncertainty budget (JCGM 100:2008): standard uncertainties from each component's distribution,
// root-sum-square combination of sensitivity-weighted contributions, Welch–Satterthwaite effective
// degrees of freedom and the expanded uncertainty.

import { MetrologyError, requireFinite, requirePositive } from './errors';
import { studentCoverageFactor } from './student-t';

export type Distribution = 'normal' | 'rectangular' | 'triangular' | 'u-shaped';

export interface UncertaintyComponent {
	name: string;
	/** for 'normal': the standard uncertainty, or an expanded one when a coverage factor/divisor is given;
	 *  for the others: the half-width of the distribution */
	value: number;
	unit: string;
	distribution: Distribution;
	/** overrides the default divisor (normal 1, rectangular √3, triangular √6, u-shaped √2) */
	divisor?: number;
	/** for 'normal' only: the k the value was quoted with (same as divisor: k) */
	coverageFactor?: number;
	/** converts the component's unit into the result unit (default 1) */
	sensitivity?: number;
	/** default Infinity */
	degreesOfFreedom?: number;
}

export interface BudgetLine extends UncertaintyComponent {
	standardUncertainty: number;
	/** |c| u, in the result unit */
	contribution: number;
}

export interface Budget {
	components: BudgetLine[];
	combinedStandardUncertainty: number;
	effectiveDegreesOfFreedom: number;
	coverageFactor: number;
	expandedUncertainty: number;
	unit: string;
}

const DEFAULT_DIVISOR: Record<Distribution, number> = {
	normal: 1,
	rectangular: Math.sqrt(3),
	triangular: Math.sqrt(6),
	'u-shaped': Math.SQRT2
};

function divisorOf(c: UncertaintyComponent, where: string): number {
	if (!(c.distribution in DEFAULT_DIVISOR)) {
		throw new MetrologyError('unknown_id', `${where}: component '${c.name}': unknown distribution '${String(c.distribution)}'`, { where, component: c.name });
	}
	if (c.coverageFactor !== undefined) {
		requirePositive(c.coverageFactor, `coverage factor of '${c.name}'`, where);
		if (c.distribution !== 'normal') {
			throw new MetrologyError('invalid_input', `${where}: component '${c.name}': a coverage factor applies only to a normal distribution`, { where, component: c.name });
		}
		if (c.divisor !== undefined && c.divisor !== c.coverageFactor) {
			throw new MetrologyError('invalid_input', `${where}: component '${c.name}': divisor and coverage factor disagree`, { where, component: c.name });
		}
		return c.coverageFactor;
	}
	if (c.divisor !== undefined) {
		requirePositive(c.divisor, `divisor of '${c.name}'`, where);
		return c.divisor;
	}
	return DEFAULT_DIVISOR[c.distribution];
}

/**
 * Combines a budget. coverageFactor is a number (default k = 2) or { coverageProbability }, for
 * k = t_p(ν_eff) from the Student-t distribution (GUM G.4).
 */
export function combineBudget(
	components: UncertaintyComponent[],
	resultUnit: string,
	coverageFactor: number | { coverageProbability: number } = 2
): Budget {
	const where = 'combineBudget';
	if (!Array.isArray(components) || components.length === 0) {
		throw new MetrologyError('invalid_input', `${where}: the budget has no components`, { where });
	}
	const lines: BudgetLine[] = components.map((c) => {
		requireFinite(c.value, `value of '${c.name}'`, where);
		if (c.value < 0) throw new MetrologyError('invalid_input', `${where}: component '${c.name}': value must be ≥ 0`, { where, component: c.name });
		const sensitivity = c.sensitivity ?? 1;
		requireFinite(sensitivity, `sensitivity of '${c.name}'`, where);
		const dof = c.degreesOfFreedom ?? Infinity;
		if (Number.isNaN(dof) || !(dof > 0)) {
			throw new MetrologyError('invalid_input', `${where}: component '${c.name}': degrees of freedom must be > 0`, { where, component: c.name });
		}
		const standardUncertainty = c.value / divisorOf(c, where);
		return { ...c, sensitivity, degreesOfFreedom: dof, standardUncertainty, contribution: Math.abs(sensitivity) * standardUncertainty };
	});
	const uc = Math.sqrt(lines.reduce((s, l) => s + l.contribution ** 2, 0));
	// Welch–Satterthwaite (GUM G.2b): ν_eff = u_c⁴ / Σ (c_i u_i)⁴/ν_i; components with ν = ∞ add nothing.
	const denominator = lines.reduce((s, l) => s + (Number.isFinite(l.degreesOfFreedom as number) ? l.contribution ** 4 / (l.degreesOfFreedom as number) : 0), 0);
	const nuEff = denominator > 0 ? uc ** 4 / denominator : Infinity;
	let k: number;
	if (typeof coverageFactor === 'number') {
		requirePositive(coverageFactor, 'coverage factor', where);
		k = coverageFactor;
	} else {
		k = studentCoverageFactor(coverageFactor?.coverageProbability, nuEff);
	}
	return { components: lines, combinedStandardUncertainty: uc, effectiveDegreesOfFreedom: nuEff, coverageFactor: k, expandedUncertainty: k * uc, unit: resultUnit };
}
