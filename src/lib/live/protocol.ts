// Message shapes of the live stream /ws/v1/live (docs/live-protocol.md). Shared by the server hub and
// the browser client; no server code here.

/** How a run's readings are reduced: with the thermometer's current calibration, with ΔW = 0 because
 *  it has none, or not at all (no R_TPW on file, unreadable coefficients). */
export type ReductionBasis = 'calibrated' | 'uncalibrated' | 'unavailable';

/** One reading as received plus what the reduction made of it (null where it could not). */
export interface LiveReading {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel: number;
	resistanceOhm: number | null;
	w: number | null;
	t90Kelvin: number | null;
	/** T90 − expected sensor temperature (assigned value + hydrostatic + pressure corrections), mK */
	deltaMilliKelvin: number | null;
	/** its timeMs is earlier than a reading the run already had: stored, left out of the detector */
	timeBackwards?: true;
	/** why the reduction failed for this reading */
	problem?: string;
}

/** The plateau detector's state, as far as screens need it (a subset of the tracker's snapshot). */
export interface DetectorState {
	state: string;
	onPlateau: boolean;
	valueKelvin: number | null;
	slopeMilliKelvinPerHour: number | null;
	slopeStdErrMilliKelvinPerHour: number | null;
	noiseMilliKelvin: number | null;
	plateauStartS: number | null;
	plateauElapsedS: number | null;
	fraction: number | null;
	remainingS: number | null;
	selfHeatingMilliKelvin: number | null;
	readings: number;
	/** the detector is still being rebuilt from stored readings after a restart */
	rebuilding: boolean;
}

export interface RunInfo {
	runId: string;
	benchId: string;
	benchName: string;
	fixedPoint: string;
	kind: string;
	state: string;
	reduction: ReductionBasis;
	reductionProblem: string | null;
	expectedKelvin: number | null;
	highestDurableSeq: number;
	readingCount: number;
}

export interface BenchSummary {
	benchId: string;
	benchName: string;
	runId: string;
	fixedPoint: string;
	kind: string;
	reduction: ReductionBasis;
	latest: LiveReading | null;
	detector: DetectorState | null;
	readingCount: number;
	/** server receipt time of the newest reading, UTC ms */
	lastReadingAtMs: number | null;
}

/**
 * One alert as screens show it (the inbox, the shell badge, the bench tile, the run page).
 * Lifecycle (our names): 'raised' — the condition holds and nobody has taken it on; 'noted' — a
 * supervisor acknowledged it with a comment; 'cleared' — the condition went away (with hysteresis) or
 * a person closed it. A condition that comes back within the hold-off reopens the same alert.
 */
export type AlertState = 'raised' | 'noted' | 'cleared';
export type AlertKind = 'drift' | 'band' | 'noise' | 'silence' | 'rtpw-shift' | 'early-end';

export interface AlertSummary {
	id: string;
	kind: AlertKind;
	state: AlertState;
	runId: string | null;
	benchId: string | null;
	benchName: string | null;
	fixedPoint: string | null;
	message: string;
	/** the value that fired it and the limit, in `unit` (mK/h, mK, s) */
	value: number | null;
	limitValue: number | null;
	unit: string;
	raisedAtMs: number;
	lastSeenAtMs: number;
	/** how many times the condition (re)appeared within this one alert */
	occurrences: number;
	acknowledgedBy: string | null;
	acknowledgedAtMs: number | null;
	ackComment: string | null;
	resolvedAtMs: number | null;
	resolvedBy: string | null;
	escalatedAtMs: number | null;
	/** worst delivery state of its e-mails: none queued, all sent, some waiting to retry, some given up */
	delivery: 'none' | 'pending' | 'sent' | 'failed';
}

export type LiveClientMessage =
	| { type: 'subscribe'; runId: string; fromSeq?: number }
	| { type: 'unsubscribe'; runId: string }
	| { type: 'subscribe-overview' }
	| { type: 'unsubscribe-overview' };

export type LiveServerMessage =
	| { type: 'hello'; user: { name: string; role: string }; serverTimeMs: number; limits: { historyReadings: number } }
	| { type: 'run'; run: RunInfo }
	| {
			type: 'readings';
			runId: string;
			/** 'history': read back from storage after (re)subscribing; 'live': as they arrive */
			source: 'history' | 'live';
			readings: LiveReading[];
			/** readings left out before these (slow connection, or history beyond the limit) */
			skipped: number;
			detector: DetectorState | null;
	  }
	| { type: 'synced'; runId: string; throughSeq: number }
	/** full: the complete list (on subscribing); otherwise only the benches that changed */
	| { type: 'overview'; benches: BenchSummary[]; full: boolean }
	| { type: 'run-ended'; runId: string; state: string }
	/** an alert was raised, reopened, acknowledged or cleared: to overview subscribers and those following its run */
	| { type: 'alert'; alert: AlertSummary }
	| { type: 'error'; code: string; message: string; runId?: string };
