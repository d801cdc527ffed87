// Where the run chart shades the plateau and draws the slope-fit line: from the live tracker while a
// run records, from the final analysis once it has stopped.
import type { DetectorState } from '$lib/live/protocol';
import { valueFromAssignedMilliKelvin } from '$lib/components/live/format';
import type { StoredAnalysisView } from './analysis-view';

/** The tracker's longest slope window (src/lib/plateau/tracker.ts default slopeWindowS). */
export const TRACKER_SLOPE_WINDOW_S = 3600;

export interface PlateauMark {
	fromMs: number;
	toMs: number;
	label: string;
}

export interface SlopeMark {
	startMs: number;
	endMs: number;
	valueMilliKelvin: number;
	slopeMilliKelvinPerHour: number;
}

export function liveMarks(d: DetectorState | null, expectedKelvin: number | null): { plateau: PlateauMark | null; slope: SlopeMark | null } {
	if (!d || d.plateauStartS === null) return { plateau: null, slope: null };
	const fromMs = d.plateauStartS * 1000;
	const toMs = (d.plateauStartS + (d.plateauElapsedS ?? 0)) * 1000;
	const plateau = { fromMs, toMs: Math.max(toMs, fromMs + 1), label: d.state === 'ended' ? 'plateau (tracker)' : 'plateau so far (tracker)' };
	const value = valueFromAssignedMilliKelvin(d, expectedKelvin);
	const slope =
		d.slopeMilliKelvinPerHour !== null && value !== null && toMs > fromMs
			? { startMs: Math.max(fromMs, toMs - TRACKER_SLOPE_WINDOW_S * 1000), endMs: toMs, valueMilliKelvin: value, slopeMilliKelvinPerHour: d.slopeMilliKelvinPerHour }
			: null;
	return { plateau, slope };
}

export function finalMarks(stored: StoredAnalysisView | null, expectedKelvin: number | null): { plateau: PlateauMark | null; slope: SlopeMark | null } {
	const a = stored?.analysis;
	const t0 = stored?.t0Ms ?? null;
	if (!a?.plateau || t0 === null) return { plateau: null, slope: null };
	const p = a.plateau;
	const plateau = { fromMs: t0 + p.start * 1000, toMs: t0 + p.end * 1000, label: 'plateau (final analysis)' };
	if (expectedKelvin === null) return { plateau, slope: null };
	// the line is drawn through the readings at the lower current (the chart shows them as measured)
	const meanKelvin = a.selfHeating?.meanAtLowCurrentKelvin ?? p.meanKelvin;
	const mid = (p.slopeWindow.start + p.slopeWindow.end) / 2;
	const endValue = (meanKelvin - expectedKelvin) * 1000 + (p.slopeMilliKelvinPerHour * (p.slopeWindow.end - mid)) / 3600;
	return { plateau, slope: { startMs: t0 + p.slopeWindow.start * 1000, endMs: t0 + p.slopeWindow.end * 1000, valueMilliKelvin: endValue, slopeMilliKelvinPerHour: p.slopeMilliKelvinPerHour } };
}

export function basisText(basis: string, problem: string | null): { text: string; tone: 'steady' | 'caution' | 'fault' } {
	if (basis === 'calibrated') return { text: 'Reduced with the thermometer’s current calibration', tone: 'steady' };
	if (basis === 'uncalibrated') return { text: 'uncalibrated: ΔW = 0 (reference function only)', tone: 'caution' };
	return { text: `No reduction: ${problem ?? 'raw values only'}`, tone: 'fault' };
}
