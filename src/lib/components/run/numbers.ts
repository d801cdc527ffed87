// The numbers panel beside the run chart: each figure with its label and unit, from the live tracker
// or from the final analysis.
import type { DetectorState } from '$lib/live/protocol';
import type { RunAnalysis } from '$lib/plateau/index';
import { ageText, durationText, fixed, percentText, signedMilliKelvin, silenceTone, slopeText, stateWording, valueFromAssignedMilliKelvin, type Tone } from '$lib/components/live/format';

export interface Figure {
	key: string;
	label: string;
	value: string;
	tone?: Tone;
	hint?: string;
	big?: boolean;
	/** words, not a number (not set in the number face) */
	text?: boolean;
}

export function liveFigures(o: {
	detector: DetectorState | null;
	kind: string;
	expectedKelvin: number | null;
	latestDeltaMilliKelvin: number | null;
	ageS: number | null;
	silenceLimitS: number;
	perMinute: number | null;
	readings: number;
}): Figure[] {
	const d = o.detector;
	const w = stateWording(d?.state, o.kind);
	const talk = silenceTone(o.ageS, o.silenceLimitS);
	return [
		{ key: 'state', label: 'Tracker', value: w.label, tone: w.tone, hint: w.hint, text: true },
		{ key: 'value', label: 'Value from the expected (mean of the last 5 min)', value: signedMilliKelvin(valueFromAssignedMilliKelvin(d, o.expectedKelvin), 3), big: true },
		{ key: 'latest', label: 'Latest reading from the expected', value: signedMilliKelvin(o.latestDeltaMilliKelvin, 3) },
		{ key: 'slope', label: 'Slope ± u', value: slopeText(d?.slopeMilliKelvinPerHour, d?.slopeStdErrMilliKelvinPerHour) },
		{ key: 'noise', label: 'Noise (standard deviation)', value: `${fixed(d?.noiseMilliKelvin, 4)} mK` },
		{ key: 'plateau-time', label: 'Time on the plateau', value: durationText(d?.plateauElapsedS) },
		{ key: 'fraction', label: 'Fraction transformed', value: percentText(d?.fraction) },
		{ key: 'remaining', label: 'Estimated time remaining', value: durationText(d?.remainingS) },
		{ key: 'self-heating', label: 'Self-heating at the lower current', value: `${fixed(d?.selfHeatingMilliKelvin, 3)} mK` },
		{ key: 'age', label: 'Last reading', value: `${ageText(o.ageS)} ago`, tone: talk.tone, hint: `instrument ${talk.label}` },
		{ key: 'rate', label: 'Reading rate', value: o.perMinute === null ? '— readings/min' : `${fixed(o.perMinute, o.perMinute >= 100 ? 0 : 1)} readings/min` },
		{ key: 'readings', label: 'Readings stored', value: `${o.readings.toLocaleString('en')} readings` }
	];
}

export function finalFigures(a: RunAnalysis | null, readings: number): Figure[] {
	const p = a?.plateau ?? null;
	return [
		{ key: 'value', label: 'Plateau value from the assigned (head and pressure removed)', value: signedMilliKelvin(a?.result?.deltaMilliKelvin, 3), big: true },
		{ key: 'slope', label: 'Plateau slope ± u', value: slopeText(p?.slopeMilliKelvinPerHour, p?.slopeStdErrMilliKelvinPerHour) },
		{ key: 'noise', label: 'Noise (standard deviation)', value: `${fixed(p?.noiseMilliKelvin, 4)} mK` },
		{ key: 'plateau-time', label: 'Plateau length', value: durationText(p ? p.end - p.start : null) },
		{ key: 'self-heating', label: 'Self-heating at the lower current', value: `${fixed(a?.selfHeating?.atLowCurrentMilliKelvin ?? p?.selfHeatingMilliKelvin, 3)} mK` },
		{ key: 'end', label: 'End of the plateau', value: a ? (a.endObserved ? 'observed (the knee)' : 'not reached before the run ended') : '—', text: true },
		{ key: 'readings', label: 'Readings analysed', value: `${(a?.readings ?? readings).toLocaleString('en')} readings` }
	];
}
