import { json } from '@sveltejs/kit';
import { sql } from 'kysely';
import { appDatabase } from '$lib/server/db';
import { ingestModes } from '$lib/server/ingest/service';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	await sql`select 1`.execute(appDatabase().db);
	// Where the ingest's writer and reducer run (null until the first instrument connects): an operator
	// sees at once whether the server fell back to in-process work.
	return json({ status: 'ok', time: new Date().toISOString(), ingest: ingestModes() });
};
