/** Shared shapes of the plateau detector. Times are in seconds on the caller's clock. */

export type PlateauKind = 'melt' | 'freeze' | 'triple-point';

export type Sample = { t: number /* s */; kelvin: number; currentMilliAmp?: number };

/**
 * States of the live tracker, in the order a run normally passes through them:
 * - `waiting`   too few readings yet to judge anything
 * - `approach`  the cell is heading for its transition (heating before a melt, cooling before a freeze,
 *               a thermometer settling in a triple-point cell)
 * - `undercool` freeze only: the liquid is below the expected freezing temperature and still falling
 *               (reported when the point or an expected temperature is known)
 * - `rebound`   freeze only: the fast rise after nucleation, up to the plateau
 * - `plateau`   on the plateau
 * - `ending`    the plateau is giving way: the trend is turning (melt: up, freeze: down)
 * - `ended`     the plateau is over; the tracker keeps the last plateau figures
 */
export type TrackerState = 'waiting' | 'approach' | 'undercool' | 'rebound' | 'plateau' | 'ending' | 'ended';

export interface PlateauResult {
	start: number;
	end: number; // s, same clock as the samples
	meanKelvin: number;
	slopeMilliKelvinPerHour: number;
	slopeStdErrMilliKelvinPerHour: number;
	slopeWindow: { start: number; end: number }; // s: where the slope was fitted
	noiseMilliKelvin: number; // standard deviation about the plateau trend
	selfHeatingMilliKelvin: number | null; // at the lower current, when two currents appear
	/** final analysis only: where the slope uncertainty comes from ('window blocks', or 'plateau noise
	 *  model' when the window is too short to show slow noise itself) */
	slopeUncertaintySource?: 'window blocks' | 'plateau noise model';
}

export interface TrackerSnapshot {
	state: TrackerState;
	onPlateau: boolean;
	/** time of the newest reading taken into account (s) */
	t: number | null;
	readings: number;
	outliers: number;
	gaps: number;
	/** mean over the recent value window, corrected to the reference current (K) */
	valueKelvin: number | null;
	/** the same extrapolated to zero current, once the self-heating is known (K) */
	zeroCurrentKelvin: number | null;
	referenceCurrentMilliAmp: number | null;
	currentMilliAmp: number | null;
	/** true while readings just after a current change are held back */
	settling: boolean;
	slopeMilliKelvinPerHour: number | null;
	slopeStdErrMilliKelvinPerHour: number | null;
	/** the span the slope was fitted over (s) */
	slopeWindowStart: number | null;
	slopeWindowEnd: number | null;
	/** lag-1 autocorrelation of the slope-fit residuals (after bias correction, ≥ 0) */
	noiseAutocorrelation: number | null;
	effectiveReadings: number | null;
	noiseMilliKelvin: number | null;
	plateauStart: number | null;
	plateauEnd: number | null;
	plateauElapsedS: number | null;
	/** fraction melted (melt, triple point) or frozen (freeze), 0..1 */
	fraction: number | null;
	remainingS: number | null;
	remainingSource: 'expected-duration' | 'raoult-curvature' | null;
	selfHeatingMilliKelvin: number | null;
	selfHeatingStdErrMilliKelvin: number | null;
}

export interface TrackerOptions {
	kind: PlateauKind;
	/** expected plateau temperature, e.g. the assigned T90 of the point (K); enables `undercool` */
	expectedKelvin?: number;
	/** expected plateau duration (s): gives fraction and time remaining from elapsed time */
	expectedDurationS?: number;
	/** |slope| below which the trend counts as flat (mK/h); common practice: a few mK/h */
	flatSlopeMilliKelvinPerHour?: number;
	/** slowest furnace ramp that must never be taken for a plateau (mK/h) */
	rampSlopeMilliKelvinPerHour?: number;
	/** window of the flatness / ending test (s) */
	detectWindowS?: number;
	/** how long the trend must stay flat before the plateau is declared (s) */
	confirmS?: number;
	/** longest window of the reported plateau slope (s) */
	slopeWindowS?: number;
	/** window of the reported mean value (s) */
	valueWindowS?: number;
	/** readings within this time after a current change are ignored (thermal settling, s) */
	settleS?: number;
	/** readings collected after settling to measure the self-heating step (s) */
	stepCollectS?: number;
	/** a silence longer than this counts as a gap (s) */
	gapS?: number;
	/** length of the blocks whose means widen the slope uncertainty for slow noise (s) */
	blockS?: number;
	/** outlier threshold in robust standard deviations */
	outlierSigma?: number;
	/** buffer capacity of the sliding fits (readings) */
	capacity?: number;
}
