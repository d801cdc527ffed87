// Alerts on the bench screens, from the alert module (src/lib/server/alerts/queries.ts). It is picked
// up at build time if it exists (import.meta.glob finds nothing otherwise), so the screens build and
// work with or without it; `null` then means "not part of this build".
import type { DB } from '../db';
import type { AlertSummary } from '$lib/live/protocol';

interface AlertQueries {
	openAlertsByBench(db: DB): Promise<Map<number, AlertSummary[]>>;
	alertsForRun(db: DB, runId: number): Promise<AlertSummary[]>;
}

const modules = import.meta.glob<AlertQueries>('../alerts/queries.ts');

async function queries(): Promise<AlertQueries | null> {
	const load = Object.values(modules)[0];
	if (!load) return null;
	try {
		const m = await load();
		return typeof m.openAlertsByBench === 'function' ? m : null;
	} catch {
		return null;
	}
}

export async function openAlertsByBench(db: DB): Promise<Record<string, AlertSummary[]> | null> {
	const q = await queries();
	if (!q) return null;
	const map = await q.openAlertsByBench(db);
	return Object.fromEntries([...map.entries()].map(([k, v]) => [String(k), v]));
}

export async function alertsForRun(db: DB, runId: number): Promise<AlertSummary[] | null> {
	const q = await queries();
	if (!q || typeof q.alertsForRun !== 'function') return null;
	return q.alertsForRun(db, runId);
}
