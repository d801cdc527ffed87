// Words and tones for the alert lifecycle on screen (shared by the inbox and the review page).
import type { AlertState, AlertSummary } from '$lib/live/protocol';

export const STATE_LABELS: Record<AlertState, string> = { raised: 'Raised', noted: 'Acknowledged', cleared: 'Cleared' };
export const STATE_TONES: Record<AlertState, string> = { raised: 'bg-fault-soft text-fault', noted: 'bg-caution-soft text-caution', cleared: 'bg-steady-soft text-steady' };
export const DELIVERY_LABELS: Record<AlertSummary['delivery'], string> = { none: 'not sent', pending: 'sending…', sent: 'sent', failed: 'failed' };

export function formatAlertValue(x: number | null, unit: string): string {
	if (x === null || !Number.isFinite(x)) return '—';
	const a = Math.abs(x);
	return `${x.toFixed(a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : 3)} ${unit}`;
}
