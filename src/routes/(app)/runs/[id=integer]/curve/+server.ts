// The run chart's readings for a time range: min/max per bucket for long runs, every reading for short
// ranges, a sampled first look with ?sampled=1 (src/lib/server/bench-screens/curve.ts).
import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { apiError } from '$lib/server/http/api-error';
import { runCurve } from '$lib/server/bench-screens/curve';
import type { RequestHandler } from './$types';

function num(v: string | null): number | undefined {
	if (v === null || v === '') return undefined;
	const n = Number(v);
	return Number.isFinite(n) ? n : NaN;
}

export const GET = (({ params, url, locals }) => {
	if (!locals.user) return apiError(401, 'unauthenticated', 'Sign in first.');
	const fromMs = num(url.searchParams.get('from'));
	const toMs = num(url.searchParams.get('to'));
	const points = num(url.searchParams.get('points'));
	if ([fromMs, toMs, points].some((v) => Number.isNaN(v))) return apiError(400, 'invalid_input', 'from, to (UTC ms) and points must be numbers.');
	const curve = runCurve(appDatabase().sqlite, Number(params.id), { fromMs, toMs, points, sampled: url.searchParams.get('sampled') === '1' });
	if (!curve) return apiError(404, 'not_found', `There is no run #${params.id}.`);
	return json(curve, { headers: { 'cache-control': 'no-store' } });
}) satisfies RequestHandler;
