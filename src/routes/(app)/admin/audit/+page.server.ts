import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { searchAudit } from '$lib/server/repositories/audit';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	requireRole(locals, ['admin']);
	const text = url.searchParams.get('q')?.trim() || undefined;
	const objectType = url.searchParams.get('type')?.trim() || undefined;
	return { entries: await searchAudit(appDatabase().db, { text, objectType, limit: 200 }), q: text ?? '', type: objectType ?? '' };
}) satisfies PageServerLoad;
