import { fitLinearModel, robustSigma } from './stats';

/**
 * Self-heating from one current change. The SPRT's self-heating grows as I², so a step Δ between
 * currents Ia and Ib gives the self-heating coefficient k = Δ / (Ib² − Ia²) (K per mA²); the
 * reading at current I is then T0 + k·I² and the value at zero current is T − k·I².
 *
 * The step is fitted with a common slope through the readings before and after the change, so a
 * steady drift (or a plateau's own slope) does not leak into it.
 */
export interface CurrentStep {
	atS: number;
	fromMilliAmp: number;
	toMilliAmp: number;
	stepKelvin: number;
	stepStdErrKelvin: number;
	kKelvinPerMilliAmp2: number;
	kStdErrKelvinPerMilliAmp2: number;
}

/** Two currents are the same setting within this relative tolerance (bridges repeat a current far better). */
export const CURRENT_TOLERANCE = 0.02;

export function sameCurrent(a: number, b: number): boolean {
	return Math.abs(a - b) <= CURRENT_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
}

export function estimateCurrentStep(
	atS: number,
	fromMilliAmp: number,
	toMilliAmp: number,
	before: { t: ArrayLike<number>; x: ArrayLike<number> },
	after: { t: ArrayLike<number>; x: ArrayLike<number> }
): CurrentStep | null {
	const dI2 = toMilliAmp * toMilliAmp - fromMilliAmp * fromMilliAmp;
	if (before.t.length < 5 || after.t.length < 5 || !(Math.abs(dI2) > 0)) return null;
	const t: number[] = [];
	const x: number[] = [];
	const post: boolean[] = [];
	for (let i = 0; i < before.t.length; i++) {
		t.push(before.t[i] - atS);
		x.push(before.x[i]);
		post.push(false);
	}
	for (let i = 0; i < after.t.length; i++) {
		t.push(after.t[i] - atS);
		x.push(after.x[i]);
		post.push(true);
	}
	let rows = t.map((_, i) => i);
	const design = (i: number) => [1, t[i], post[i] ? 1 : 0];
	let fit = fitLinearModel(rows, design, x);
	if (!fit) return null;
	// one pass of outlier rejection: spikes would otherwise bias a short step estimate
	const s = robustSigma(fit.residuals);
	if (s > 0) {
		const keep = rows.filter((_, r) => Math.abs(fit!.residuals[r]) <= 5 * s);
		if (keep.length < rows.length && keep.some((i) => post[i]) && keep.some((i) => !post[i])) {
			const refit = fitLinearModel(keep, design, x);
			if (refit) {
				fit = refit;
				rows = keep;
			}
		}
	}
	const step = fit.coef[2];
	const u = fit.stdErr[2];
	if (!Number.isFinite(step) || !Number.isFinite(u)) return null;
	return {
		atS,
		fromMilliAmp,
		toMilliAmp,
		stepKelvin: step,
		stepStdErrKelvin: u,
		kKelvinPerMilliAmp2: step / dI2,
		kStdErrKelvinPerMilliAmp2: u / Math.abs(dI2)
	};
}

/** Inverse-variance mean of several k estimates. */
export function combineSteps(steps: CurrentStep[]): { k: number; u: number } | null {
	let sw = 0;
	let swk = 0;
	for (const s of steps) {
		const u = Math.max(s.kStdErrKelvinPerMilliAmp2, 1e-15);
		sw += 1 / (u * u);
		swk += s.kKelvinPerMilliAmp2 / (u * u);
	}
	return sw > 0 ? { k: swk / sw, u: 1 / Math.sqrt(sw) } : null;
}
