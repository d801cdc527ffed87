import { error, redirect } from '@sveltejs/kit';
import type { Role, SessionUser } from './types';

/** For loads and actions: the signed-in user, or a redirect to the sign-in page. */
export function requireUser(locals: App.Locals, url?: URL): SessionUser {
	if (!locals.user) {
		const next = url ? `?next=${encodeURIComponent(url.pathname + url.search)}` : '';
		redirect(303, `/sign-in${next}`);
	}
	return locals.user;
}

/** For loads and actions: the user if their role is one of `roles`, otherwise 403. */
export function requireRole(locals: App.Locals, roles: readonly Role[], url?: URL): SessionUser {
	const user = requireUser(locals, url);
	if (!roles.includes(user.role)) {
		error(403, { message: `This needs the ${roles.join(' or ')} role; you are signed in as ${user.role}.`, code: 'forbidden' });
	}
	return user;
}
