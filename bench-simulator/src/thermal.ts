// Lumped thermal pieces around the cell: the furnace (or bath) and first-order lags.
// The cell itself (latent heat, phase) lives in cell.ts.

/** Exact update of a first-order lag over dtS, stable for any step (no Euler blow-up). */
export function lagStep(valueK: number, targetK: number, dtS: number, timeConstantS: number): number {
	if (timeConstantS <= 0) return targetK;
	return targetK + (valueK - targetK) * Math.exp(-dtS / timeConstantS);
}

/** A furnace or bath whose controller moves the actual temperature toward its set point at a
 *  limited ramp rate. When control is lost (heater stuck on) it runs away at a fixed rate. */
export class Furnace {
	temperatureK: number;
	setpointK: number;
	private rampKelvinPerS: number;
	private runawayKelvinPerS: number | null = null;
	private runawayLimitK = Number.POSITIVE_INFINITY;

	constructor(startK: number, setpointK: number, rampKelvinPerMinute: number) {
		this.temperatureK = startK;
		this.setpointK = setpointK;
		this.rampKelvinPerS = Math.abs(rampKelvinPerMinute) / 60;
	}

	setSetpoint(setpointK: number): void {
		this.setpointK = setpointK;
	}

	/** Heater stuck: the temperature runs at driftKelvinPerHour until the over-temperature cut-out
	 *  holds it at limitK (an upper limit for a positive drift, a lower one for a negative drift). */
	loseControl(driftKelvinPerHour: number, limitK: number): void {
		this.runawayKelvinPerS = driftKelvinPerHour / 3600;
		this.runawayLimitK = limitK;
	}

	get controlLost(): boolean {
		return this.runawayKelvinPerS !== null;
	}

	step(dtS: number): void {
		if (this.runawayKelvinPerS !== null) {
			const next = this.temperatureK + this.runawayKelvinPerS * dtS;
			this.temperatureK = this.runawayKelvinPerS >= 0 ? Math.min(next, Math.max(this.runawayLimitK, this.temperatureK)) : Math.max(next, Math.min(this.runawayLimitK, this.temperatureK));
			return;
		}
		const gap = this.setpointK - this.temperatureK;
		const maxMove = this.rampKelvinPerS * dtS;
		this.temperatureK = Math.abs(gap) <= maxMove ? this.setpointK : this.temperatureK + Math.sign(gap) * maxMove;
	}
}

/** Heat flowing from the furnace into the cell through the lumped conductance, in watts. */
export function heatFlowWatt(conductanceWattPerKelvin: number, furnaceK: number, sampleK: number): number {
	return conductanceWattPerKelvin * (furnaceK - sampleK);
}
