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
	| { type: 'error'; code: string; message: string; runId?: string };
