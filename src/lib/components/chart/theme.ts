import type { Tone } from './types';

export interface ThemeColours {
	ink: string;
	muted: string;
	line: string;
	panel: string;
	tones: Record<Tone, string>;
}

/** The theme's colours from the CSS variables of src/app.css (read again when the theme changes). */
export function readThemeColours(root: HTMLElement = document.documentElement): ThemeColours {
	const style = getComputedStyle(root);
	const v = (name: string, fallback: string) => style.getPropertyValue(`--sp-${name}`).trim() || fallback;
	const ink = v('ink', '#18201d');
	const muted = v('muted', '#56625c');
	return {
		ink,
		muted,
		line: v('line', '#c9d0ca'),
		panel: v('panel', '#fbfbf8'),
		tones: { steady: v('steady', '#0d6b62'), caution: v('caution', '#9a5200'), fault: v('fault', '#b0271c'), signal: v('signal', '#3d48a3'), muted, ink }
	};
}

/** "2026-03-04 05:06 UTC": chart ticks and tooltips say UTC, as every time in Stillpoint does. */
export function formatUtcTick(ms: number, spanMs: number): string {
	const iso = new Date(ms).toISOString();
	if (spanMs > 60 * 86_400_000) return iso.slice(0, 10);
	if (spanMs > 2 * 86_400_000) return `${iso.slice(5, 10)} ${iso.slice(11, 16)}`;
	return iso.slice(11, spanMs > 3_600_000 ? 16 : 19);
}
