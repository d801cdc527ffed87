// Display helpers shared by pages. Every value is shown with its unit beside it.

export function formatUtc(ms: number | null | undefined): string {
	if (ms == null) return '—';
	return new Date(ms).toISOString().replace('T', ' ').slice(0, 16) + ' UTC';
}

export function formatDate(ms: number | null | undefined): string {
	if (ms == null) return '—';
	return new Date(ms).toISOString().slice(0, 10);
}

export function formatFixed(value: number | null | undefined, digits: number): string {
	if (value == null || !Number.isFinite(value)) return '—';
	return value.toFixed(digits);
}

export const FIXED_POINT_NAMES: Record<string, string> = {
	Ar: 'Argon triple point',
	Hg: 'Mercury triple point',
	TPW: 'Water triple point',
	Ga: 'Gallium melting point',
	In: 'Indium freezing point',
	Sn: 'Tin freezing point',
	Zn: 'Zinc freezing point',
	Al: 'Aluminium freezing point',
	Ag: 'Silver freezing point'
};

export const RUN_STATE_LABELS: Record<string, string> = {
	setup: 'Setting up',
	recording: 'Recording',
	finished: 'Finished',
	abandoned: 'Abandoned'
};
