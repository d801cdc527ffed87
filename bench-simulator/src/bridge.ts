// The resistance-ratio bridge: R_x / R_s with the standard resistor at its bath temperature,
// bridge noise (white + slowly correlated), occasional outliers, and a 9-digit display.

import { standardResistorOhm, type StandardResistor } from '../../src/lib/metrology/index';
import type { Rng } from './prng';

export interface NoiseParams {
	/** White noise, temperature-equivalent at the sensor, µK (1 σ). */
	whiteNoiseMicroKelvin: number;
	/** AR(1) noise (bath regulation, leads, slow drifts of the bridge), µK (1 σ, stationary). */
	correlatedNoiseMicroKelvin: number;
	correlationTimeS: number;
	/** Chance that one reading is an outlier (a glitch on the bridge), per reading. */
	outlierProbability: number;
	outlierMicroKelvin: number;
}

export const SIGNIFICANT_DIGITS = 9;

/** Rounds like a bridge display with a fixed number of significant digits. */
export function roundSignificant(x: number, digits = SIGNIFICANT_DIGITS): number {
	if (!Number.isFinite(x) || x === 0) return x;
	return Number(x.toPrecision(digits));
}

/** Stationary first-order autoregressive noise sampled every dtS. */
export class Ar1 {
	private x: number;
	constructor(private readonly sigma: number, private readonly tauS: number, private readonly rng: Rng) {
		this.x = sigma * rng.normal();
	}
	next(dtS: number): number {
		if (this.sigma === 0) return 0;
		const phi = this.tauS > 0 ? Math.exp(-dtS / this.tauS) : 0;
		this.x = phi * this.x + Math.sqrt(1 - phi * phi) * this.sigma * this.rng.normal();
		return this.x;
	}
}

export interface BridgeConfig {
	resistor: StandardResistor;
	bathTemperatureCelsius: number;
	/** Slow wander of the resistor bath, mK (1 σ), correlation time 30 min. */
	bathWanderMilliKelvin: number;
	noise: NoiseParams;
}

export class Bridge {
	private readonly whiteRng: Rng;
	private readonly slow: Ar1;
	private readonly bath: Ar1;
	private readonly outlierRng: Rng;

	constructor(private readonly cfg: BridgeConfig, rng: Rng) {
		this.whiteRng = rng.fork('white');
		this.outlierRng = rng.fork('outlier');
		this.slow = new Ar1(cfg.noise.correlatedNoiseMicroKelvin, cfg.noise.correlationTimeS, rng.fork('ar1'));
		this.bath = new Ar1(cfg.bathWanderMilliKelvin, 1800, rng.fork('bath'));
	}

	/** Temperature-equivalent noise for the next reading, kelvin, and whether it is an outlier. */
	noiseKelvin(dtS: number): { noiseK: number; outlier: boolean } {
		const n = this.cfg.noise;
		let micro = n.whiteNoiseMicroKelvin * this.whiteRng.normal() + this.slow.next(dtS);
		const outlier = this.outlierRng.next() < n.outlierProbability;
		if (outlier) micro += (this.outlierRng.next() < 0.5 ? -1 : 1) * n.outlierMicroKelvin * (1 + this.outlierRng.next());
		return { noiseK: micro * 1e-6, outlier };
	}

	/** The displayed ratio R_x / R_s(t_bath) for a thermometer resistance. */
	ratio(resistanceOhm: number, dtS: number): number {
		const bathC = this.cfg.bathTemperatureCelsius + this.bath.next(dtS) * 1e-3;
		return roundSignificant(resistanceOhm / standardResistorOhm(this.cfg.resistor, bathC));
	}
}
