// The sample in the cell as one enthalpy node: solid, liquid (possibly supercooled) or two-phase.
// Two-phase temperature follows the impurity law handed in (Raoult: T = T_pure - (c/A)/F), so the
// plateau length comes out of the heat balance rather than being scripted.

export type Phase = 'solid' | 'liquid' | 'two-phase';

export interface CellConfig {
	/** Impurity-free transition temperature at the sensor (head and pressure already included), K. */
	pureKelvin: number;
	/** Depression below pureKelvin at liquid fraction F (F already floored by the caller), K. */
	depressionKelvin: (liquidFraction: number) => number;
	/** Below this liquid fraction the 1/F law is held constant: stands in for the solidus / eutectic
	 *  so the curve stays finite at the very end of a freeze and the very start of a melt. */
	solidusLiquidFraction: number;
	/** Sensible heat capacity of sample plus crucible, J/K. */
	heatCapacityJPerKelvin: number;
	/** Latent heat of the whole sample, J (moles × molar enthalpy of fusion). */
	latentHeatJoule: number;
}

export interface CellState {
	phase: Phase;
	temperatureK: number;
	liquidFraction: number;
}

export class Cell {
	constructor(readonly cfg: CellConfig) {}

	equilibriumKelvin(liquidFraction: number): number {
		const f = Math.min(1, Math.max(liquidFraction, this.cfg.solidusLiquidFraction));
		return this.cfg.pureKelvin - this.cfg.depressionKelvin(f);
	}

	/** dT_eq/dF: zero where the curve is held flat below the solidus fraction. */
	private slopeKelvinPerFraction(liquidFraction: number): number {
		if (liquidFraction <= this.cfg.solidusLiquidFraction) return 0;
		// one-sided at the top end, where F cannot exceed 1
		const h = Math.min(1e-4, liquidFraction * 1e-3);
		const hi = Math.min(1, liquidFraction + h);
		return (this.equilibriumKelvin(hi) - this.equilibriumKelvin(hi - 2 * h)) / (2 * h);
	}

	twoPhase(liquidFraction: number): CellState {
		return { phase: 'two-phase', liquidFraction, temperatureK: this.equilibriumKelvin(liquidFraction) };
	}

	/** Advance by one step with heat heatInWatt flowing in. A liquid is not allowed to start freezing
	 *  on its own (it supercools until nucleate() is called); a solid starts melting at the solidus. */
	step(s: CellState, heatInWatt: number, dtS: number): CellState {
		const dH = heatInWatt * dtS;
		const { heatCapacityJPerKelvin: C, latentHeatJoule: L } = this.cfg;
		if (s.phase === 'liquid') return { ...s, temperatureK: s.temperatureK + dH / C };
		if (s.phase === 'solid') {
			const t = s.temperatureK + dH / C;
			const solidusK = this.equilibriumKelvin(0);
			if (t <= solidusK) return { ...s, temperatureK: t };
			return this.step(this.twoPhase(0), (C * (t - solidusK)) / dtS, dtS);
		}
		// two-phase: dH = (L + C dT/dF) dF
		const perFraction = L + C * this.slopeKelvinPerFraction(s.liquidFraction);
		const f = s.liquidFraction + dH / perFraction;
		if (f >= 1) {
			const excessJ = (f - 1) * perFraction;
			return { phase: 'liquid', liquidFraction: 1, temperatureK: this.equilibriumKelvin(1) + excessJ / C };
		}
		if (f <= 0) {
			const deficitJ = -f * perFraction;
			return { phase: 'solid', liquidFraction: 0, temperatureK: this.equilibriumKelvin(0) - deficitJ / C };
		}
		return this.twoPhase(f);
	}

	/** Nucleation of a supercooled liquid: the latent heat of the part that freezes at once warms the
	 *  whole sample back to the equilibrium curve (recalescence). Solves C (T_eq(F) - T) = L (1 - F). */
	nucleate(s: CellState): CellState {
		if (s.phase !== 'liquid' || s.temperatureK >= this.equilibriumKelvin(1)) return s;
		const { heatCapacityJPerKelvin: C, latentHeatJoule: L } = this.cfg;
		const g = (f: number) => C * (this.equilibriumKelvin(f) - s.temperatureK) - L * (1 - f);
		if (g(0) >= 0) return { phase: 'solid', liquidFraction: 0, temperatureK: s.temperatureK + L / C };
		let lo = 0;
		let hi = 1;
		for (let i = 0; i < 60; i++) {
			const mid = (lo + hi) / 2;
			if (g(mid) > 0) hi = mid;
			else lo = mid;
		}
		return this.twoPhase((lo + hi) / 2);
	}
}
