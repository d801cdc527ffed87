import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listUsers } from '$lib/server/repositories/users';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals }) => {
	requireRole(locals, ['admin']);
	return json({ users: await listUsers(appDatabase().db) });
};
