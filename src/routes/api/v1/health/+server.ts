import { json } from '@sveltejs/kit';
import { sql } from 'kysely';
import { appDatabase } from '$lib/server/db';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	await sql`select 1`.execute(appDatabase().db);
	return json({ status: 'ok', time: new Date().toISOString() });
};
