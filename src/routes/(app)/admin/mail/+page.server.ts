import { requireRole } from '$lib/server/auth/guard';
import { mailSettings } from '$lib/server/mail/config';
import { readMailStore } from '$lib/server/mail/store';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals }) => {
	requireRole(locals, ['admin']);
	const s = mailSettings();
	return { relay: s.describe, from: s.from, store: s.fakeStore, messages: readMailStore(s.fakeStore, { limit: 200 }) };
}) satisfies PageServerLoad;
