import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { readingsCsvStream } from '$lib/server/export/readings-csv';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = ({ params, locals }) => {
	requireUser(locals);
	const runId = Number(params.id);
	const stream = readingsCsvStream(appDatabase().sqlite, runId);
	if (!stream) error(404, { message: `There is no run #${runId}.` });
	return new Response(stream, {
		headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="stillpoint-run-${runId}-readings.csv"` }
	});
};
