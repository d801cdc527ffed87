import { PairRing, ValueRing } from './ring';
import { SlidingFit } from './sliding-fit';
import { MAD_TO_SIGMA, finiteOrNull, type LineFit } from './stats';
import { estimateCurrentStep, sameCurrent } from './current-step';
import type { PlateauKind, TrackerOptions, TrackerSnapshot, TrackerState } from './types';

/** K/s → mK/h */
const TO_MK_PER_H = 3.6e6;

const DEFAULTS = {
	// common practice: a good plateau drifts by well under 10 mK/h; furnace ramps are ≥ 50 mK/h
	flatSlopeMilliKelvinPerHour: 15,
	rampSlopeMilliKelvinPerHour: 50,
	detectWindowS: 600,
	confirmS: 300,
	slopeWindowS: 3600,
	valueWindowS: 300,
	// common practice: an SPRT settles to a new current within a minute or so
	settleS: 60,
	stepCollectS: 300,
	gapS: 300,
	outlierSigma: 6,
	blockS: 120,
	capacity: 4096
} as const;

type Resolved = Required<Omit<TrackerOptions, 'expectedKelvin' | 'expectedDurationS'>> &
	Pick<TrackerOptions, 'expectedKelvin' | 'expectedDurationS'>;

/** Readings held back (suspected outliers, or readings waiting for a self-heating step). */
const SUSPECT_RUN = 3; // this many consecutive same-side deviations are a real change, not spikes
const SHORT_FIT = 24; // readings in the outlier predictor
const RESIDUAL_RING = 31;
const HOLD_CAPACITY = 256;
const PRE_CAPACITY = 128;
/** absolute floor of the outlier scale: bridge resolution is of order 0.1 µK (common practice) */
const NOISE_FLOOR_KELVIN = 1e-7;
const BLOCK_CAPACITY = 512;
const MIN_BLOCKS = 8;
/** below the expected value by more than this the liquid counts as undercooled (K) */
const UNDERCOOL_MARGIN_KELVIN = 0.005;

interface PlateauFigures {
	valueKelvin: number | null;
	slope: LineFit | null;
	quadraticRemainingS: number | null;
}

export interface PlateauTracker {
	push(t: number, kelvin: number, currentMilliAmp?: number): TrackerSnapshot;
	snapshot(): TrackerSnapshot;
	toJSON(): TrackerJSON;
	/** sizes of the internal buffers (for the bounded-memory check) */
	bufferSizes(): Record<string, number>;
}

export interface TrackerJSON {
	version: 1;
	options: TrackerOptions;
	pushes: { t: number; kelvin: number; currentMilliAmp: number | null }[];
}

export function createPlateauTracker(options: TrackerOptions): PlateauTracker {
	return new Tracker(options);
}

/**
 * Rebuilds a tracker from `toJSON()` output. The saved form is the bounded tail of readings the
 * tracker still needs, replayed through a fresh tracker; counters older than that tail restart.
 */
export function restorePlateauTracker(json: TrackerJSON): PlateauTracker {
	const tr = new Tracker(json.options);
	for (const p of json.pushes) tr.push(p.t, p.kelvin, p.currentMilliAmp ?? undefined);
	return tr;
}

class Tracker implements PlateauTracker {
	private readonly o: Resolved;
	private readonly kind: PlateauKind;
	private state: TrackerState = 'waiting';

	// fits over accepted readings (values corrected to the reference current)
	private readonly detect: SlidingFit;
	private readonly value: SlidingFit;
	private readonly slopeFit: SlidingFit;
	/** block means of the slope window: their scatter carries slow (bath) noise that a lag-1
	 * correction on single readings misses when white noise sits on top of it */
	private readonly blockFit: SlidingFit;
	private blockN = 0;
	private blockT = 0;
	private blockX = 0;
	private blockStart = NaN;
	private readonly short = new SlidingFit(SHORT_FIT);
	private readonly residuals = new ValueRing(RESIDUAL_RING);
	private readonly suspects: { t: number; x: number; raw: number; i: number | null; sign: number }[] = [];

	// self-heating bookkeeping
	private referenceI: number | null = null;
	private currentI: number | null = null;
	private lowestI: number | null = null;
	private kSumW = 0;
	private kSumWK = 0;
	private settleUntil = -Infinity;
	private collectUntil = -Infinity;
	private switchAt = NaN;
	private switchFrom = NaN;
	private readonly preRing = new PairRing(PRE_CAPACITY); // raw readings at the present current
	private preFrozen: { t: number[]; x: number[] } | null = null;
	private readonly hold = new PairRing(HOLD_CAPACITY); // raw readings after settling, awaiting the step

	// replay tail for toJSON: bounded to what the fits can remember
	private readonly replay: PairRing;
	private readonly replayI: ValueRing;

	private lastT: number | null = null;
	private typicalDtS: number | null = null;
	private readings = 0;
	private outliers = 0;
	private gaps = 0;

	private candidateSince: number | null = null;
	private sawFall = false;
	private sawRebound = false;
	private plateauStart: number | null = null;
	private plateauEnd: number | null = null;
	private endingSince: number | null = null;
	private calmSince: number | null = null;
	private frozen: PlateauFigures | null = null;
	private frozenLine: { mean: number; slope: number; tMean: number; sigma: number } | null = null;
	private cached: TrackerSnapshot | null = null;
	private plateauNoiseVariance: number | null = null;
	private scaleKelvin = 0;
	private scaleAge = 0;

	constructor(options: TrackerOptions) {
		const o = { ...DEFAULTS, ...stripUndefined(options) } as Resolved;
		if (!['melt', 'freeze', 'triple-point'].includes(o.kind)) throw new TypeError(`unknown kind ${String(o.kind)}`);
		this.o = o;
		this.kind = o.kind;
		this.detect = new SlidingFit(o.capacity);
		this.value = new SlidingFit(o.capacity);
		this.slopeFit = new SlidingFit(o.capacity);
		this.blockFit = new SlidingFit(BLOCK_CAPACITY);
		this.replay = new PairRing(o.capacity);
		this.replayI = new ValueRing(o.capacity);
	}

	bufferSizes(): Record<string, number> {
		return {
			detect: this.detect.capacity,
			blocks: this.blockFit.capacity,
			value: this.value.capacity,
			slope: this.slopeFit.capacity,
			short: this.short.capacity,
			residuals: this.residuals.capacity,
			suspects: this.suspects.length,
			pre: this.preRing.capacity,
			hold: this.hold.capacity,
			replay: this.replay.capacity,
			detectUsed: this.detect.size,
			slopeUsed: this.slopeFit.size
		};
	}

	push(t: number, kelvin: number, currentMilliAmp?: number): TrackerSnapshot {
		if (!Number.isFinite(t) || !Number.isFinite(kelvin)) return this.snapshot();
		if (this.lastT !== null && t <= this.lastT) return this.snapshot(); // duplicates and late arrivals
		this.readings++;
		this.cached = null;
		if (this.lastT !== null) {
			const dt = t - this.lastT;
			if (dt > this.o.gapS) this.gaps++;
			else this.typicalDtS = this.typicalDtS === null ? dt : 0.98 * this.typicalDtS + 0.02 * dt;
		}
		this.lastT = t;
		const i = typeof currentMilliAmp === 'number' && Number.isFinite(currentMilliAmp) && currentMilliAmp > 0 ? currentMilliAmp : this.currentI;
		this.recordReplay(t, kelvin, i);

		if (i !== null) {
			if (this.referenceI === null) this.referenceI = i;
			if (this.currentI !== null && !sameCurrent(i, this.currentI)) this.onCurrentChange(t, this.currentI, i);
			this.currentI = i;
			this.lowestI = this.lowestI === null ? i : Math.min(this.lowestI, i);
		}

		if (t < this.settleUntil) return this.snapshot();
		if (t < this.collectUntil) {
			if (this.hold.full) this.finishStep();
			else {
				this.hold.push(t, kelvin);
				return this.snapshot();
			}
		} else if (this.preFrozen) this.finishStep();

		this.accept(t, kelvin, i);
		return this.snapshot();
	}

	private recordReplay(t: number, kelvin: number, i: number | null): void {
		if (this.replay.full) this.replay.shift();
		this.replay.push(t, kelvin);
		this.replayI.push(i ?? NaN);
	}

	// ---- current switching -------------------------------------------------------------------

	private kKnown(): number | null {
		return this.kSumW > 0 ? this.kSumWK / this.kSumW : null;
	}

	private onCurrentChange(t: number, from: number, to: number): void {
		// a new change while the previous step is still being measured: settle what can be settled
		if (this.preFrozen) this.finishStep();
		const pre = this.preRing.toJSON();
		this.preRing.clear();
		this.preFrozen = pre;
		this.switchAt = t;
		this.switchFrom = from;
		this.settleUntil = t + this.o.settleS;
		this.collectUntil = this.settleUntil + this.o.stepCollectS;
		this.hold.clear();
		this.suspects.length = 0; // spikes pending across a switch are meaningless now
	}

	private finishStep(): void {
		const pre = this.preFrozen;
		this.preFrozen = null;
		this.collectUntil = -Infinity;
		const post = this.hold.toJSON();
		this.hold.clear();
		if (pre && this.currentI !== null) {
			const step = estimateCurrentStep(this.switchAt, this.switchFrom, this.currentI, pre, post);
			if (step && step.kStdErrKelvinPerMilliAmp2 > 0) {
				const w = 1 / (step.kStdErrKelvinPerMilliAmp2 * step.kStdErrKelvinPerMilliAmp2);
				this.kSumW += w;
				this.kSumWK += w * step.kKelvinPerMilliAmp2;
			}
		}
		if (this.kKnown() === null && this.currentI !== null && this.referenceI !== null && !sameCurrent(this.currentI, this.referenceI)) {
			return; // no way to bring these readings to the reference current: drop them
		}
		for (let k = 0; k < post.t.length; k++) this.accept(post.t[k], post.x[k], this.currentI);
	}

	private corrected(kelvin: number, i: number | null): number {
		const k = this.kKnown();
		if (k === null || i === null || this.referenceI === null) return kelvin;
		return kelvin - k * (i * i - this.referenceI * this.referenceI);
	}

	// ---- outliers ---------------------------------------------------------------------------

	private accept(t: number, raw: number, i: number | null): void {
		const x = this.corrected(raw, i);
		if (this.short.size < 6) {
			this.feed(t, x, raw);
			return;
		}
		const s = this.short.line();
		const pred = s ? s.mean + s.slope * (t - s.tMean) : this.short.valueAt(this.short.size - 1);
		const r = x - pred;
		// the scale moves slowly: a fresh median every few readings is enough (and keeps push cheap)
		if (this.residuals.size >= 5 && (this.scaleAge++ >= 4 || this.scaleKelvin === 0)) {
			this.scaleKelvin = MAD_TO_SIGMA * this.residuals.median();
			this.scaleAge = 0;
		}
		const scale = Math.max(this.scaleKelvin, NOISE_FLOOR_KELVIN);
		this.residuals.push(Math.abs(r));
		if (Math.abs(r) <= this.o.outlierSigma * scale) {
			this.outliers += this.suspects.length;
			this.suspects.length = 0;
			this.feed(t, x, raw);
			return;
		}
		const sign = Math.sign(r);
		if (this.suspects.length && this.suspects[0].sign !== sign) {
			this.outliers += this.suspects.length;
			this.suspects.length = 0;
		}
		this.suspects.push({ t, x, raw, i, sign });
		if (this.suspects.length >= SUSPECT_RUN) {
			// a run of deviations on one side is a real change of level or rate: take it
			const run = this.suspects.splice(0);
			this.short.clear();
			for (const p of run) this.feed(p.t, p.x, p.raw);
		}
	}

	// ---- fits and states ----------------------------------------------------------------------

	private feed(t: number, x: number, raw: number): void {
		this.short.push(t, x);
		this.detect.push(t, x);
		this.detect.dropBefore(t - this.o.detectWindowS);
		this.value.push(t, x);
		this.value.dropBefore(t - this.o.valueWindowS);
		this.slopeFit.push(t, x);
		const left = this.onPlateauLike() && this.plateauStart !== null ? Math.max(this.plateauStart, t - this.o.slopeWindowS) : t - this.o.slopeWindowS;
		this.slopeFit.dropBefore(left);
		if (Number.isNaN(this.blockStart)) this.blockStart = t;
		if (t - this.blockStart >= this.o.blockS && this.blockN > 0) {
			this.blockFit.push(this.blockT / this.blockN, this.blockX / this.blockN);
			this.blockN = this.blockT = this.blockX = 0;
			this.blockStart = t;
		}
		this.blockN++;
		this.blockT += t;
		this.blockX += x;
		this.blockFit.dropBefore(left);
		if (this.preRing.full) this.preRing.shift();
		this.preRing.push(t, raw);
		while (this.preRing.size > 0 && this.preRing.t(0) < t - this.o.stepCollectS) this.preRing.shift();
		this.step(t);
	}

	private onPlateauLike(): boolean {
		return this.state === 'plateau' || this.state === 'ending';
	}

	private slopeMK(f: LineFit): { s: number; u: number } {
		return { s: f.slope * TO_MK_PER_H, u: f.slopeStdErr * TO_MK_PER_H };
	}

	private step(t: number): void {
		if (this.state === 'ended') return;
		const d = this.detect.line();
		const spanOk = d !== null && d.tEnd - d.tStart >= 0.8 * this.o.detectWindowS && d.n >= 10;
		if (!spanOk || !d) return;
		if (this.state === 'waiting') this.state = 'approach';
		const { s, u } = this.slopeMK(d);
		const flatLimit = this.o.flatSlopeMilliKelvinPerHour;
		const ramp = this.o.rampSlopeMilliKelvinPerHour;
		const valueNow = this.value.line()?.mean ?? d.mean;

		if (this.state === 'approach' || this.state === 'undercool' || this.state === 'rebound') {
			if (this.kind === 'freeze') {
				if (s + 3 * u < -ramp) this.sawFall = true;
				const sh = this.short.line();
				const fastRise = sh !== null && this.slopeMK(sh).s - 3 * this.slopeMK(sh).u > ramp;
				if (this.state !== 'rebound' && (fastRise || (s - 3 * u > ramp && this.sawFall))) {
					this.state = 'rebound';
					this.sawRebound = true;
				} else if (
					this.state === 'approach' &&
					this.o.expectedKelvin !== undefined &&
					valueNow < this.o.expectedKelvin - UNDERCOOL_MARGIN_KELVIN &&
					s <= 0
				) {
					this.state = 'undercool';
				}
			}
			// a ramp of the slowest furnace rate must be excluded with confidence, not just on average
			const flat = Math.abs(s) < flatLimit && Math.abs(s) + 3 * u < ramp;
			const nearExpected = this.o.expectedKelvin !== undefined && Math.abs(valueNow - this.o.expectedKelvin) < 0.05;
			const allowed = this.kind !== 'freeze' || !this.sawFall || this.sawRebound || nearExpected;
			if (flat && allowed && this.state !== 'undercool') {
				this.candidateSince ??= t;
				if (t - this.candidateSince >= this.o.confirmS) this.enterPlateau(t, d);
			} else this.candidateSince = null;
			return;
		}

		// On the plateau: is it turning? The detect fit's own uncertainty balloons as soon as the
		// window holds a bend (the residuals turn serially correlated), which would hide the very
		// turn we look for: judge the slope against the noise learnt on the plateau instead.
		// The smallest long-run variance seen over a well-filled window: noise does not shrink, but a
		// plateau's own curvature (a freeze rolling off) inflates later estimates and would hide the turn.
		if (this.state === 'plateau' && !(Math.abs(s) > flatLimit)) {
			const lf = this.plateauLine();
			if (lf && lf.tEnd - lf.tStart >= 0.5 * this.o.slopeWindowS && lf.longRunVariance > 0) {
				this.plateauNoiseVariance = this.plateauNoiseVariance === null ? lf.longRunVariance : Math.min(this.plateauNoiseVariance, lf.longRunVariance);
			}
		}
		const un = this.plateauNoiseVariance !== null ? Math.sqrt(this.plateauNoiseVariance / d.timeSpread) * TO_MK_PER_H : u;
		const up = s - 2 * un > flatLimit;
		const down = s + 2 * un < -flatLimit;
		const turning = this.kind === 'melt' ? up || s + 2 * un < -ramp : this.kind === 'freeze' ? down || s - 2 * un > ramp : up || down;
		const fast = Math.abs(s) - 3 * un > ramp;
		if (this.state === 'plateau') {
			if (turning) {
				this.state = 'ending';
				this.endingSince = t;
				this.calmSince = null;
				this.frozen = this.figures();
				const f = this.frozen.slope;
				this.frozenLine = f ? { mean: f.mean, slope: f.slope, tMean: f.tMean, sigma: f.sigma } : null;
			}
			return;
		}
		// ending
		const fl = this.frozenLine;
		const departure = fl ? Math.abs(valueNow - (fl.mean + fl.slope * (t - fl.tMean))) : 0;
		const departed = fl !== null && departure > Math.max(30 * fl.sigma, 0.002);
		if (fast || departed) {
			this.state = 'ended';
			this.plateauEnd = this.estimateEnd(t);
			return;
		}
		if (!turning) {
			this.calmSince ??= t;
			if (t - this.calmSince >= this.o.detectWindowS / 2) {
				this.state = 'plateau';
				this.endingSince = null;
				this.frozen = null;
				this.frozenLine = null;
			}
		} else this.calmSince = null;
	}

	/** Declares the plateau and dates its start back to where the readings joined the plateau line. */
	private enterPlateau(t: number, d: LineFit): void {
		const band = Math.max(6 * d.sigma, 2e-5);
		let start = this.slopeFit.oldestTime();
		for (let k = this.slopeFit.size - 1; k >= 0; k--) {
			const tk = this.slopeFit.timeAt(k);
			const dev = this.slopeFit.valueAt(k) - (d.mean + d.slope * (tk - d.tMean));
			if (Math.abs(dev) > band) {
				start = k + 1 < this.slopeFit.size ? this.slopeFit.timeAt(k + 1) : tk;
				break;
			}
		}
		this.state = 'plateau';
		this.plateauStart = start;
		this.slopeFit.dropBefore(start);
		this.blockFit.dropBefore(start);
		this.candidateSince = null;
		void t;
	}

	/** The end is the last reading still within the noise band of the plateau line. */
	private estimateEnd(t: number): number {
		const fl = this.frozenLine;
		if (!fl) return this.endingSince ?? t;
		const band = Math.max(6 * fl.sigma, 2e-5);
		for (let k = this.slopeFit.size - 1; k >= 0; k--) {
			const tk = this.slopeFit.timeAt(k);
			if (Math.abs(this.slopeFit.valueAt(k) - (fl.mean + fl.slope * (tk - fl.tMean))) <= band) return tk;
		}
		return this.endingSince ?? t;
	}

	/** Slope fit of the window with the larger of the reading-level and block-level uncertainties. */
	private plateauLine(): LineFit | null {
		const line = this.slopeFit.line();
		if (!line) return null;
		const blocks = this.blockFit.size >= MIN_BLOCKS ? this.blockFit.line() : null;
		if (!blocks || !(blocks.slopeStdErr > line.slopeStdErr)) return line;
		const ratio = blocks.slopeStdErr / line.slopeStdErr;
		return {
			...line,
			slopeStdErr: blocks.slopeStdErr,
			meanStdErr: Math.max(line.meanStdErr, blocks.meanStdErr),
			inflation: line.inflation * ratio * ratio,
			rho: Math.max(line.rho, blocks.rho),
			longRunVariance: blocks.slopeStdErr * blocks.slopeStdErr * line.timeSpread
		};
	}

	private figures(): PlateauFigures {
		const slope = this.plateauLine();
		const v = this.value.line();
		let quadraticRemainingS: number | null = null;
		if (this.kind === 'freeze') {
			// Raoult: T = T_pure − K/(t_end − t) ⇒ t_end − t = 2·(dT/dt)/(d²T/dt²); only when the curvature is clear
			const q = this.slopeFit.quadratic();
			if (q && q.slopeAtEnd < 0 && q.curvature < 0 && q.curvature < -3 * q.curvatureStdErr && q.slopeAtEnd < -2 * q.slopeAtEndStdErr) {
				quadraticRemainingS = (2 * q.slopeAtEnd) / q.curvature;
			}
		}
		return { valueKelvin: v ? v.mean : this.value.size ? this.value.valueAt(this.value.size - 1) : null, slope, quadraticRemainingS };
	}

	snapshot(): TrackerSnapshot {
		if (this.cached) return this.cached;
		const onPlateau = this.state === 'plateau' || this.state === 'ending';
		const useFrozen = this.state === 'ended' && this.frozen;
		const fig = useFrozen ? this.frozen! : this.figures();
		const fit = onPlateau || useFrozen ? fig.slope : this.detect.line();
		const k = this.kKnown();
		const kU = this.kSumW > 0 ? 1 / Math.sqrt(this.kSumW) : null;
		const endT = this.state === 'ended' ? this.plateauEnd : this.lastT;
		const elapsed = this.plateauStart !== null && endT !== null ? endT - this.plateauStart : null;
		let fraction: number | null = null;
		let remainingS: number | null = null;
		let remainingSource: TrackerSnapshot['remainingSource'] = null;
		if (this.state === 'ended') {
			fraction = 1;
			remainingS = 0;
		} else if (onPlateau && elapsed !== null) {
			if (this.o.expectedDurationS) {
				fraction = Math.min(Math.max(elapsed / this.o.expectedDurationS, 0), 1);
				remainingS = Math.max(this.o.expectedDurationS - elapsed, 0);
				remainingSource = 'expected-duration';
			} else if (fig.quadraticRemainingS !== null) {
				remainingS = fig.quadraticRemainingS;
				fraction = elapsed / (elapsed + remainingS);
				remainingSource = 'raoult-curvature';
			}
		}
		const low = this.lowestI;
		const value = finiteOrNull(fig.valueKelvin);
		this.cached = {
			state: this.state,
			onPlateau,
			t: this.lastT,
			readings: this.readings,
			outliers: this.outliers,
			gaps: this.gaps,
			valueKelvin: value,
			zeroCurrentKelvin: value !== null && k !== null && this.referenceI !== null ? finiteOrNull(value - k * this.referenceI * this.referenceI) : null,
			referenceCurrentMilliAmp: this.referenceI,
			currentMilliAmp: this.currentI,
			settling: this.lastT !== null && (this.lastT < this.settleUntil || this.lastT < this.collectUntil),
			slopeMilliKelvinPerHour: fit ? finiteOrNull(fit.slope * TO_MK_PER_H) : null,
			slopeStdErrMilliKelvinPerHour: fit ? finiteOrNull(fit.slopeStdErr * TO_MK_PER_H) : null,
			slopeWindowStart: fit ? finiteOrNull(fit.tStart) : null,
			slopeWindowEnd: fit ? finiteOrNull(fit.tEnd) : null,
			noiseAutocorrelation: fit ? finiteOrNull(fit.rho) : null,
			effectiveReadings: fit ? finiteOrNull(fit.n / fit.inflation) : null,
			noiseMilliKelvin: fit ? finiteOrNull(fit.sigma * 1000) : null,
			plateauStart: this.plateauStart,
			plateauEnd: this.plateauEnd,
			plateauElapsedS: finiteOrNull(elapsed),
			fraction: finiteOrNull(fraction),
			remainingS: finiteOrNull(remainingS),
			remainingSource,
			selfHeatingMilliKelvin: k !== null && low !== null ? finiteOrNull(k * low * low * 1000) : null,
			selfHeatingStdErrMilliKelvin: kU !== null && low !== null ? finiteOrNull(kU * low * low * 1000) : null
		};
		return this.cached;
	}

	toJSON(): TrackerJSON {
		const pushes: TrackerJSON['pushes'] = [];
		const currents = this.replayI.values();
		for (let k = 0; k < this.replay.size; k++) {
			const i = currents[currents.length - this.replay.size + k];
			pushes.push({ t: this.replay.t(k), kelvin: this.replay.x(k), currentMilliAmp: Number.isFinite(i) ? i : null });
		}
		return { version: 1, options: { ...this.o }, pushes };
	}
}

function stripUndefined<T extends object>(o: T): Partial<T> {
	return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}
