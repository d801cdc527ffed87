// Wording and number formatting of the bench screens. Every figure comes back with its unit.
import type { DetectorState } from '$lib/live/protocol';

export type Tone = 'steady' | 'caution' | 'fault' | 'signal' | 'muted';

/** Our own words for the tracker's states (src/lib/plateau/types.ts), by the kind of realization. */
export function stateWording(state: string | null | undefined, kind: string): { label: string; tone: Tone; hint: string } {
	switch (state) {
		case 'waiting':
			return { label: 'Gathering readings', tone: 'muted', hint: 'Too few readings yet to judge the trend.' };
		case 'approach':
			return kind === 'melt'
				? { label: 'Warming towards the melt', tone: 'signal', hint: 'The cell is heading for its transition.' }
				: kind === 'freeze'
					? { label: 'Cooling towards the freeze', tone: 'signal', hint: 'The cell is heading for its transition.' }
					: { label: 'Thermometer settling', tone: 'signal', hint: 'The freshly inserted thermometer is settling in the cell.' };
		case 'undercool':
			return { label: 'Liquid below the freezing point', tone: 'signal', hint: 'Supercooled: waiting for nucleation.' };
		case 'rebound':
			return { label: 'Recovering after nucleation', tone: 'signal', hint: 'Rising back to the plateau.' };
		case 'plateau':
			return { label: 'On the plateau', tone: 'steady', hint: 'The reading is flat within the tracker’s limits.' };
		case 'ending':
			return { label: 'Plateau giving way', tone: 'caution', hint: 'The trend is turning: the plateau is nearly over.' };
		case 'ended':
			return { label: 'Plateau over', tone: 'muted', hint: 'The tracker keeps the last plateau figures.' };
		default:
			return { label: 'No tracker figures yet', tone: 'muted', hint: 'The tracker reports once readings arrive.' };
	}
}

export function fixed(v: number | null | undefined, digits: number): string {
	if (v == null || !Number.isFinite(v)) return '—';
	const s = v.toFixed(digits);
	// no "-0.000"
	return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/** "+0.123 mK": signed, so a glance tells above from below. */
export function signedMilliKelvin(v: number | null | undefined, digits = 3): string {
	if (v == null || !Number.isFinite(v)) return '— mK';
	const s = fixed(v, digits);
	return `${v > 0 && Number(s) !== 0 ? '+' : ''}${s} mK`;
}

export function slopeText(slope: number | null | undefined, u: number | null | undefined): string {
	if (slope == null || !Number.isFinite(slope)) return '— mK/h';
	return u == null || !Number.isFinite(u) ? `${fixed(slope, 3)} mK/h` : `${fixed(slope, 3)} ± ${fixed(u, 3)} mK/h`;
}

/** "1 h 05 min", "12 min 30 s", "45 s". */
export function durationText(seconds: number | null | undefined): string {
	if (seconds == null || !Number.isFinite(seconds) || seconds < 0) return '—';
	const s = Math.round(seconds);
	if (s < 60) return `${s} s`;
	if (s < 3600) return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
	if (s < 86_400 * 3) return `${Math.floor(s / 3600)} h ${String(Math.floor((s % 3600) / 60)).padStart(2, '0')} min`;
	return `${Math.floor(s / 86_400)} d ${Math.floor((s % 86_400) / 3600)} h`;
}

export function percentText(fraction: number | null | undefined): string {
	return fraction == null || !Number.isFinite(fraction) ? '— %' : `${fixed(fraction * 100, 0)} %`;
}

/** The value of the tracker against the expected sensor temperature, mK. */
export function valueFromAssignedMilliKelvin(d: DetectorState | null | undefined, expectedKelvin: number | null | undefined): number | null {
	if (!d || d.valueKelvin == null || expectedKelvin == null) return null;
	return (d.valueKelvin - expectedKelvin) * 1000;
}

/**
 * Is the instrument talking? Caution past half the silence limit, fault past it. `ageS` null means no
 * reading yet.
 */
export function silenceTone(ageS: number | null, silenceLimitS: number): { tone: Tone; label: string } {
	if (ageS === null) return { tone: 'muted', label: 'no reading yet' };
	if (ageS >= silenceLimitS) return { tone: 'fault', label: 'silent' };
	if (ageS >= silenceLimitS / 2) return { tone: 'caution', label: 'slow' };
	return { tone: 'steady', label: 'talking' };
}

export function ageText(ageS: number | null): string {
	if (ageS === null) return '— s';
	return ageS < 600 ? `${Math.max(0, Math.floor(ageS))} s` : durationText(ageS);
}

/** Readings per minute from the receipt times of the last minute. */
export class RateMeter {
	private readonly times: number[] = [];
	private counts: number[] = [];
	private startedAtMs: number | null = null;
	constructor(private readonly windowMs = 60_000) {}
	add(count: number, atMs: number): void {
		this.startedAtMs ??= atMs;
		this.times.push(atMs);
		this.counts.push(count);
		this.trim(atMs);
	}
	perMinute(nowMs: number): number | null {
		this.trim(nowMs);
		if (this.times.length === 0) return null;
		const total = this.counts.reduce((a, b) => a + b, 0);
		// Until a full window has passed since the first reading, scale by the time observed (at least 5 s).
		const span = Math.max(5_000, Math.min(this.windowMs, nowMs - (this.startedAtMs ?? nowMs)));
		return (total * 60_000) / span;
	}
	private trim(nowMs: number): void {
		while (this.times.length && this.times[0] < nowMs - this.windowMs) {
			this.times.shift();
			this.counts.shift();
		}
	}
}

export const TONE_TEXT: Record<Tone, string> = {
	steady: 'text-steady',
	caution: 'text-caution',
	fault: 'text-fault',
	signal: 'text-signal',
	muted: 'text-muted'
};
export const TONE_SOFT: Record<Tone, string> = {
	steady: 'bg-steady-soft text-steady',
	caution: 'bg-caution-soft text-caution',
	fault: 'bg-fault-soft text-fault',
	signal: 'bg-panel-raised text-signal',
	muted: 'bg-panel-raised text-muted'
};

/** What each kind of alert is about, in a few words. */
export const ALERT_KIND_WORDS: Record<string, string> = {
	drift: 'Plateau drifting',
	band: 'Value outside its band',
	noise: 'Noisy readings',
	silence: 'Instrument silent',
	'rtpw-shift': 'R_TPW shifted',
	'early-end': 'Plateau ended early'
};
