import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { apiRole } from '$lib/server/alerts/http';
import { openAlertCount } from '$lib/server/alerts/queries';
import type { RequestHandler } from './$types';

/** The shell badge polls this: open alerts (raised or acknowledged, not yet cleared). */
export const GET: RequestHandler = async ({ locals }) => {
	const user = apiRole(locals, ['supervisor', 'engineer', 'admin']);
	if (user instanceof Response) return user;
	return json({ open: await openAlertCount(appDatabase().db) });
};
