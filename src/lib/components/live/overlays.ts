// A Chart.js plugin that draws what a run chart needs behind and over its line: the plateau window
// shaded, stretches at a raised current as a band, and events as marks on the time axis. It reads a
// mutable Overlay at draw time, so the page updates it and calls chart.update('none').
import type { Chart, Plugin } from 'chart.js';
import { readThemeColours } from '$lib/components/chart/theme';
import type { TimeBand } from './series';

export interface OverlayEvent {
	timeMs: number;
	label: string;
}

export interface Overlay {
	plateau: { fromMs: number; toMs: number; label: string } | null;
	bands: TimeBand[];
	events: OverlayEvent[];
}

export function emptyOverlay(): Overlay {
	return { plateau: null, bands: [], events: [] };
}

function withAlpha(colour: string, alpha: number): string {
	const m = /^#([0-9a-f]{6})$/i.exec(colour.trim());
	if (!m) return colour;
	const n = parseInt(m[1], 16);
	return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}

export function overlayPlugin(overlay: () => Overlay, opts: { eventLabels?: boolean } = {}): Plugin<'line'> {
	return {
		id: 'stillpointOverlay',
		beforeDatasetsDraw(chart: Chart) {
			const o = overlay();
			const x = chart.scales.x;
			const area = chart.chartArea;
			if (!x || !area) return;
			const c = readThemeColours();
			const ctx = chart.ctx;
			ctx.save();
			ctx.beginPath();
			ctx.rect(area.left, area.top, area.right - area.left, area.bottom - area.top);
			ctx.clip();
			const span = (a: number, b: number) => {
				const l = Math.max(area.left, x.getPixelForValue(a));
				const r = Math.min(area.right, x.getPixelForValue(b));
				return r > l ? [l, Math.max(r - l, 1)] : null;
			};
			for (const band of o.bands) {
				const s = span(band.fromMs, band.toMs);
				if (!s) continue;
				ctx.fillStyle = withAlpha(c.tones.signal, 0.14);
				ctx.fillRect(s[0], area.top, s[1], area.bottom - area.top);
			}
			if (o.plateau) {
				const s = span(o.plateau.fromMs, o.plateau.toMs);
				if (s) {
					ctx.fillStyle = withAlpha(c.tones.steady, 0.16);
					ctx.fillRect(s[0], area.top, s[1], area.bottom - area.top);
					ctx.fillStyle = c.tones.steady;
					ctx.font = '600 13px "Atkinson Hyperlegible", sans-serif';
					ctx.textBaseline = 'bottom';
					if (s[1] > 90) ctx.fillText(o.plateau.label, s[0] + 6, area.bottom - 4);
				}
			}
			ctx.restore();
		},
		afterDatasetsDraw(chart: Chart) {
			const o = overlay();
			const x = chart.scales.x;
			const area = chart.chartArea;
			if (!x || !area || o.events.length === 0) return;
			const c = readThemeColours();
			const ctx = chart.ctx;
			ctx.save();
			ctx.strokeStyle = c.tones.caution;
			ctx.fillStyle = c.tones.caution;
			ctx.lineWidth = 1.5;
			ctx.setLineDash([5, 4]);
			ctx.font = '13px "Atkinson Hyperlegible", sans-serif';
			ctx.textBaseline = 'top';
			let lastLabelRight = -Infinity;
			let row = 0;
			for (const e of o.events) {
				const px = x.getPixelForValue(e.timeMs);
				if (px < area.left || px > area.right) continue;
				ctx.beginPath();
				ctx.moveTo(px, area.top);
				ctx.lineTo(px, area.bottom);
				ctx.stroke();
				// a small triangle on the time axis
				ctx.setLineDash([]);
				ctx.beginPath();
				ctx.moveTo(px - 5, area.bottom);
				ctx.lineTo(px + 5, area.bottom);
				ctx.lineTo(px, area.bottom - 8);
				ctx.fill();
				ctx.setLineDash([5, 4]);
				if (opts.eventLabels !== false) {
					const w = ctx.measureText(e.label).width;
					// labels that would overlap the previous one drop a row (three rows, then skipped)
					row = px + 4 < lastLabelRight ? row + 1 : 0;
					if (row < 3) {
						const lx = Math.min(px + 4, area.right - w - 2);
						ctx.fillStyle = withAlpha(c.panel, 0.85);
						ctx.fillRect(lx - 2, area.top + 2 + row * 17, w + 4, 16);
						ctx.fillStyle = c.tones.caution;
						ctx.fillText(e.label, lx, area.top + 3 + row * 17);
						lastLabelRight = Math.max(lastLabelRight, lx + w + 6);
					}
				}
			}
			ctx.restore();
		}
	};
}
