import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { apiRole } from '$lib/server/alerts/http';
import { alertInbox, openAlertCount } from '$lib/server/alerts/queries';
import { apiError } from '$lib/server/http/api-error';
import type { RequestHandler } from './$types';

const STATES = ['open', 'raised', 'noted', 'cleared', 'all'] as const;

export const GET: RequestHandler = async ({ locals, url }) => {
	const user = apiRole(locals, ['supervisor', 'engineer', 'admin']);
	if (user instanceof Response) return user;
	const state = (url.searchParams.get('state') ?? 'open') as (typeof STATES)[number];
	if (!STATES.includes(state)) return apiError(400, 'invalid_state', `state is one of ${STATES.join(', ')}.`);
	const { db } = appDatabase();
	return json({ alerts: await alertInbox(db, { state }), openCount: await openAlertCount(db) });
};
