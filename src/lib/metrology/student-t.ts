// Student-t coverage factors for the GUM budget option "k from ν_eff" (GUM, JCGM 100:2008, Annex G).
// Two-sided: P(|T| ≤ t) = 1 − I_{ν/(ν+t²)}(ν/2, 1/2), I the regularized incomplete beta function.

import { MetrologyError, requireFinite } from './errors';

function lnGamma(x: number): number {
	// Lanczos approximation (g = 7, n = 9), about 15 significant digits for x > 0.
	const g = 7;
	const c = [
		0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
		12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7
	];
	if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
	x -= 1;
	let a = c[0];
	const t = x + g + 0.5;
	for (let i = 1; i < g + 2; i++) a += c[i] / (x + i);
	return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Continued fraction for the incomplete beta (modified Lentz). */
function betaContinuedFraction(a: number, b: number, x: number): number {
	const tiny = 1e-300;
	let c = 1;
	let d = 1 - ((a + b) * x) / (a + 1);
	if (Math.abs(d) < tiny) d = tiny;
	d = 1 / d;
	let h = d;
	for (let m = 1; m <= 10000; m++) {
		const m2 = 2 * m;
		let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
		d = 1 + aa * d;
		if (Math.abs(d) < tiny) d = tiny;
		c = 1 + aa / c;
		if (Math.abs(c) < tiny) c = tiny;
		d = 1 / d;
		h *= d * c;
		aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
		d = 1 + aa * d;
		if (Math.abs(d) < tiny) d = tiny;
		c = 1 + aa / c;
		if (Math.abs(c) < tiny) c = tiny;
		d = 1 / d;
		const del = d * c;
		h *= del;
		if (Math.abs(del - 1) < 1e-15) return h;
	}
	throw new MetrologyError('not_converged', 'incomplete beta: continued fraction did not converge', { a, b, x });
}

function regularizedBeta(x: number, a: number, b: number): number {
	if (x <= 0) return 0;
	if (x >= 1) return 1;
	const front = Math.exp(lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
	if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
	return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

function erf(x: number): number {
	// Maclaurin series; used only for |x| < 3.5, where cancellation still leaves ~1e-9.
	let sum = 0;
	let term = x;
	for (let n = 0; n < 200; n++) {
		const add = term / (2 * n + 1);
		sum += add;
		if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
		term *= (-x * x) / (n + 1);
	}
	return (2 / Math.sqrt(Math.PI)) * sum;
}

/** P(|T| ≤ t) for ν degrees of freedom; ν = Infinity gives the normal distribution. */
export function studentTwoSidedProbability(t: number, nu: number): number {
	if (t <= 0) return 0;
	if (!Number.isFinite(nu) || nu > 1e6) return t / Math.SQRT2 >= 3.5 ? 1 : erf(t / Math.SQRT2);
	return 1 - regularizedBeta(nu / (nu + t * t), nu / 2, 0.5);
}

/**
 * Coverage factor k = t_p(ν): the two-sided Student-t quantile. ν must be ≥ 1; a fractional ν is
 * truncated to the next lower integer, as GUM G.6.4 recommends for its Table G.2 (memory).
 */
export function studentCoverageFactor(coverageProbability: number, degreesOfFreedom: number): number {
	const where = 'studentCoverageFactor';
	requireFinite(coverageProbability, 'coverage probability', where);
	if (!(coverageProbability > 0.5 && coverageProbability < 0.9999)) {
		throw new MetrologyError('out_of_range', `${where}: coverage probability must be within 0.5 to 0.9999, got ${coverageProbability}`, { where, coverageProbability });
	}
	if (Number.isNaN(degreesOfFreedom) || degreesOfFreedom < 1) {
		throw new MetrologyError('out_of_range', `${where}: degrees of freedom must be ≥ 1, got ${degreesOfFreedom}`, { where, degreesOfFreedom });
	}
	const nu = Number.isFinite(degreesOfFreedom) ? Math.floor(degreesOfFreedom) : Infinity;
	let lo = 0;
	let hi = 1;
	while (studentTwoSidedProbability(hi, nu) < coverageProbability) hi *= 2;
	for (let i = 0; i < 200 && hi - lo > 1e-12 * hi; i++) {
		const mid = 0.5 * (lo + hi);
		if (studentTwoSidedProbability(mid, nu) < coverageProbability) lo = mid;
		else hi = mid;
	}
	return 0.5 * (lo + hi);
}
