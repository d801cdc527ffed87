import { error } from '@sveltejs/kit';
import { AREAS } from '$lib/navigation';
import { roleMayOpen } from '$lib/server/auth/access';
import { requireUser } from '$lib/server/auth/guard';
import { labName } from '$lib/server/repositories/settings';
import { appDatabase } from '$lib/server/db';
import { openAlertCount } from '$lib/server/alerts/queries';
import type { LayoutServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	const user = requireUser(locals, url);
	// `handle` decided this role may not open the page: the 403 page is rendered inside the shell.
	if (locals.forbidden) error(403, { message: locals.forbidden, code: 'forbidden' });
	return {
		user,
		areas: AREAS.filter((a) => roleMayOpen(user.role, a.path)).map((a) => a.path),
		labName: await labName(appDatabase().db),
		// The shell's alert badge (supervisors, engineers, admins); the layout polls it while open.
		openAlerts: roleMayOpen(user.role, '/alerts') ? await openAlertCount(appDatabase().db) : null
	};
}) satisfies LayoutServerLoad;
