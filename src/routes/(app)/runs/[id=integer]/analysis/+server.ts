// The final analysis of a run that has stopped recording (cached in run.analysis_json). Fetched by the
// run page after its chart has drawn, so a long run's first analysis never delays the chart.
import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { apiError } from '$lib/server/http/api-error';
import { cachedRunAnalysis, storedRunAnalysis } from '$lib/server/analysis/run-analysis';
import { analyseInBackground } from '$lib/server/analysis/background';
import type { RequestHandler } from './$types';

export const GET = (async ({ params, locals }) => {
	if (!locals.user) return apiError(401, 'unauthenticated', 'Sign in first.');
	const { sqlite, path } = appDatabase();
	const runId = Number(params.id);
	const run = sqlite.prepare('select state from run where id = ?').get(runId) as { state: string } | undefined;
	if (!run) return apiError(404, 'not_found', `There is no run #${runId}.`);
	if (run.state === 'recording' || run.state === 'setup') return apiError(409, 'conflict', 'The final analysis is made once the run has stopped recording.');
	// Computed on the analysis worker, so this request waits but no other request does.
	if (cachedRunAnalysis(sqlite, runId) === 'stale') await analyseInBackground(sqlite, path, runId);
	return json(storedRunAnalysis(sqlite, runId), { headers: { 'cache-control': 'no-store' } });
}) satisfies RequestHandler;
