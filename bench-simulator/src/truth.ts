// Ground truth of a run, accumulated from the same pipeline items the readings come from, so a
// plateau detector can be scored against what really happened in the model.

import type { Derived, PipelineItem } from './engine';
import type { ScenarioParams } from './params';
import { selfHeatingKelvin } from './thermometer';
import type { GroundTruth } from './types';

/** Sensor within this of the cell's equilibrium temperature (self-heating aside) = on the plateau. */
const SETTLED_KELVIN = 1e-4;
const MS_PER_HOUR = 3.6e6;
const FRACTION_STEPS = Array.from({ length: 19 }, (_, i) => Math.round((i + 1) * 5) / 100);

class Series {
	t = new Float64Array(1024);
	y = new Float64Array(1024);
	f = new Float64Array(1024);
	/** 1 where the tick gave a reading, 0 for a silent tick (dropout) */
	reading = new Uint8Array(1024);
	n = 0;
	push(t: number, y: number, f: number, reading: boolean) {
		if (this.n === this.t.length) {
			const grow = (a: Float64Array) => {
				const b = new Float64Array(a.length * 2);
				b.set(a);
				return b;
			};
			this.t = grow(this.t);
			this.y = grow(this.y);
			this.f = grow(this.f);
			const r = new Uint8Array(this.reading.length * 2);
			r.set(this.reading);
			this.reading = r;
		}
		this.t[this.n] = t;
		this.y[this.n] = y;
		this.f[this.n] = f;
		this.reading[this.n] = reading ? 1 : 0;
		this.n++;
	}
}

/** Least-squares slope of the noise-free well temperature over [fromMs, toMs], K/ms (every tick,
 *  or only the ticks that gave a reading). */
function slopePerMs(s: Series, fromMs: number, toMs: number, readingsOnly = false): number | null {
	const use = (i: number) => s.t[i] >= fromMs && s.t[i] <= toMs && (!readingsOnly || s.reading[i] === 1);
	let n = 0, st = 0, sy = 0;
	for (let i = 0; i < s.n; i++) if (use(i)) { n++; st += s.t[i]; sy += s.y[i]; }
	if (n < 3) return null;
	const tm = st / n, ym = sy / n;
	let sxy = 0, sxx = 0;
	for (let i = 0; i < s.n; i++) if (use(i)) { sxy += (s.t[i] - tm) * (s.y[i] - ym); sxx += (s.t[i] - tm) ** 2; }
	return sxx > 0 ? sxy / sxx : null;
}

/**
 * The noise-free well temperature of a run, tick by tick. A detector states the window it fitted
 * its slope over; the plateau curve is not a straight line (Raoult: T ≈ T_pure − c/F), so its true
 * slope depends on the window, and a detector is scored like against like only over its own window.
 * Kept beside the GroundTruth rather than in it: GroundTruth is written to JSON by the CLI, and a
 * trace of every tick would make that file as large as the run.
 */
export class NoiseFreeTrace {
	/** @internal built by TruthBuilder */
	constructor(private readonly series: Series) {}

	/** Least-squares slope of the noise-free well temperature over the readings (not the silent
	 *  ticks of a dropout, which a detector never sees) with times in [fromMs, toMs], mK/h; null when
	 *  fewer than three readings fall in the window. */
	slopeMilliKelvinPerHour(fromMs: number, toMs: number): number | null {
		const perMs = slopePerMs(this.series, fromMs, toMs, true);
		return perMs === null ? null : perMs * MS_PER_HOUR * 1000;
	}
}

export class TruthBuilder {
	private readonly series = new Series();
	private plateauStartMs: number | null = null;
	private plateauEndMs: number | null = null;
	private nucleationMs: number | null = null;
	private innerInterfaceMs: number | null = null;
	private readingCount = 0;
	private endMs: number;
	private prev: { timeMs: number; f: number } | null = null;
	private readonly timeline: { liquidFraction: number; timeMs: number }[] = [];
	private readonly outlierSeqs: number[] = [];
	private readonly bad: GroundTruth['faults']['badValues'] = [];
	private controlLostMs: number | null = null;
	/** +1: liquid fraction grows (melting), −1: shrinks (freezing). */
	private readonly direction: 1 | -1;

	constructor(private readonly scenario: string, private readonly seed: number, private readonly p: ScenarioParams, private readonly d: Derived) {
		this.endMs = p.epochMs;
		this.direction = p.kind === 'freeze' || (p.kind === 'triple-point' && p.furnaceOffsetKelvin < 0) ? -1 : 1;
	}

	add(item: PipelineItem): void {
		if (item.type === 'event') {
			const e = item.event;
			if (e.kind === 'nucleation-induced') this.nucleationMs = e.timeMs;
			if (e.kind === 'inner-interface-formed') this.innerInterfaceMs = e.timeMs;
			if (e.kind === 'fault-furnace-control-lost') this.controlLostMs = e.timeMs;
			if (e.kind === 'nucleation-induced' || e.kind === 'inner-interface-formed') this.plateauStartMs = null; // disturbed: look again
			return;
		}
		const s = item.sample;
		if (item.type === 'reading') {
			this.readingCount++;
			if (item.tag === 'outlier') this.outlierSeqs.push(item.reading.seq);
			else if (item.tag && item.tag !== 'duplicate') this.bad.push({ seq: item.reading.seq, kind: item.tag, timeMs: item.reading.timeMs });
			else if (item.tag === 'duplicate' && !this.bad.some((b) => b.seq === item.reading.seq)) this.bad.push({ seq: item.reading.seq, kind: 'duplicate', timeMs: item.reading.timeMs });
			if (item.tag === 'duplicate' && this.prev?.timeMs === s.timeMs) return; // the copy adds nothing to the physics
		}
		this.endMs = s.timeMs;
		const twoPhase = s.phase === 'two-phase';
		const settled = twoPhase && Math.abs(s.elementK - selfHeatingKelvin(this.p.thermometer, s.currentMilliAmp) - s.sensedK) < SETTLED_KELVIN;
		if (this.plateauStartMs === null && this.plateauEndMs === null && settled) this.plateauStartMs = s.timeMs;
		if (this.plateauStartMs !== null && this.plateauEndMs === null && !twoPhase) this.plateauEndMs = s.timeMs;
		this.series.push(s.timeMs, s.wellK, s.liquidFraction, item.type === 'reading');

		// fraction timeline, interpolated between ticks
		if (this.prev && (twoPhase || s.liquidFraction === 0 || s.liquidFraction === 1)) {
			for (const level of FRACTION_STEPS) {
				if (this.timeline.some((x) => x.liquidFraction === level)) continue;
				const a = this.prev.f, b = s.liquidFraction;
				const crossed = this.direction < 0 ? a > level && b <= level : a < level && b >= level;
				if (crossed) this.timeline.push({ liquidFraction: level, timeMs: this.prev.timeMs + ((level - a) / (b - a)) * (s.timeMs - this.prev.timeMs) });
			}
		}
		this.prev = { timeMs: s.timeMs, f: s.liquidFraction };
	}

	/** The noise-free trace of the run so far (shares the builder's storage; call after the run). */
	trace(): NoiseFreeTrace {
		return new NoiseFreeTrace(this.series);
	}

	private fractionTime(liquidFraction: number): number | null {
		return this.timeline.find((x) => x.liquidFraction === liquidFraction)?.timeMs ?? null;
	}

	finish(): GroundTruth {
		const { p, d } = this;
		// central part of the plateau: 20–80 % of the fraction changed, else 20–80 % of its time
		let slopeWindow: GroundTruth['slopeWindow'] = null;
		const fA = this.fractionTime(this.direction < 0 ? 0.8 : 0.2);
		const fB = this.fractionTime(this.direction < 0 ? 0.2 : 0.8);
		if (fA !== null && fB !== null && this.plateauStartMs !== null && fA >= this.plateauStartMs) {
			slopeWindow = { startMs: fA, endMs: fB, basis: 'fraction 20-80 %' };
		} else if (this.plateauStartMs !== null) {
			const end = this.plateauEndMs ?? this.endMs;
			const span = end - this.plateauStartMs;
			slopeWindow = { startMs: this.plateauStartMs + 0.2 * span, endMs: this.plateauStartMs + 0.8 * span, basis: 'time 20-80 %' };
		}
		const perMs = slopeWindow ? slopePerMs(this.series, slopeWindow.startMs, slopeWindow.endMs) : null;
		const notes: string[] = [];
		if (this.plateauStartMs === null) notes.push('no settled plateau in this run');
		if (this.plateauEndMs === null && this.plateauStartMs !== null) notes.push('the run ended before the knee');
		return {
			scenario: this.scenario,
			seed: this.seed,
			point: p.point,
			kind: p.kind,
			fault: p.fault,
			epochMs: p.epochMs,
			endMs: this.endMs,
			readingCount: this.readingCount,
			readingIntervalS: p.readingIntervalS,
			plateauStartMs: this.plateauStartMs,
			plateauEndMs: this.plateauEndMs,
			nucleationMs: this.nucleationMs,
			innerInterfaceMs: this.innerInterfaceMs,
			assignedKelvin: d.assignedKelvin,
			hydrostaticKelvin: d.hydrostaticKelvin,
			pressureKelvin: d.pressureKelvin,
			pureKelvin: d.pureKelvin,
			liquidusKelvin: d.pureKelvin - d.liquidusDepressionKelvin,
			liquidusDepressionMilliKelvin: d.liquidusDepressionKelvin * 1000,
			trueSlopeMilliKelvinPerHour: perMs === null ? null : perMs * MS_PER_HOUR * 1000,
			slopeWindow,
			fractionTimeline: this.timeline,
			selfHeatingMilliKelvinAtLowCurrent: selfHeatingKelvin(p.thermometer, p.lowCurrentMilliAmp) * 1000,
			selfHeatingMilliKelvinAtHighCurrent: selfHeatingKelvin(p.thermometer, p.highCurrentMilliAmp) * 1000,
			lowCurrentMilliAmp: p.lowCurrentMilliAmp,
			highCurrentMilliAmp: p.highCurrentMilliAmp,
			impurityMolFraction: p.impurityMolFraction,
			noise: {
				whiteNoiseMicroKelvin: p.whiteNoiseMicroKelvin,
				correlatedNoiseMicroKelvin: p.correlatedNoiseMicroKelvin,
				correlationTimeS: p.correlationTimeS,
				outlierProbability: p.outlierProbability,
				outlierMicroKelvin: p.outlierMicroKelvin
			},
			thermometer: p.thermometer,
			resistor: { ...p.resistor, bathTemperatureCelsius: p.resistorBathCelsius },
			depthMetre: p.depthMetre,
			pressurePa: p.pressurePa,
			furnaceOffsetKelvin: p.furnaceOffsetKelvin,
			conductanceWattPerKelvin: p.conductanceWattPerKelvin,
			latentHeatJoule: d.latentHeatJoule,
			expectedPlateauHours: d.latentHeatJoule / (p.conductanceWattPerKelvin * Math.abs(p.furnaceOffsetKelvin)) / 3600,
			faults: {
				dropouts: d.faults.dropouts.map((x) => ({ startMs: p.epochMs + x.startS * 1000, endMs: p.epochMs + x.endS * 1000 })),
				disconnects: d.faults.disconnects.map((x) => ({ atMs: p.epochMs + x.atS * 1000, durationMs: x.durationS * 1000 })),
				badValues: this.bad,
				furnaceControlLostMs: this.controlLostMs
			},
			outlierSeqs: this.outlierSeqs,
			notes,
			params: p
		};
	}
}
