import type { Handle, ServerInit } from '@sveltejs/kit';
import { building } from '$app/environment';
import { svelteKitHandler } from 'better-auth/svelte-kit';
import { appDatabase } from '$lib/server/db';
import { appAuth } from '$lib/server/auth';
import { accessFor, decideAccess } from '$lib/server/auth/access';
import { toSessionUser } from '$lib/server/auth/session';
import { apiError } from '$lib/server/http/api-error';
import { registerSocketHooks } from '$lib/server/live/upgrade';

export const init: ServerInit = async () => {
	await appDatabase().ready;
	// WebSocket upgrades (/ws/...) and graceful shutdown are handed to server.js through globalThis.
	if (!building) registerSocketHooks();
};

function isApi(path: string): boolean {
	return path.startsWith('/api/');
}

// Authentication and authorisation for every request, from the one table in $lib/server/auth/access.
export const handle: Handle = async ({ event, resolve }) => {
	if (building) return resolve(event);
	await appDatabase().ready;
	const auth = appAuth();
	const path = event.url.pathname;

	// Instrument endpoints authenticate by bench token, never by session: skip the session lookup, which
	// would otherwise cost more than storing a batch of readings.
	if (accessFor(path) === 'bench-token') {
		event.locals.user = null;
		event.locals.sessionId = null;
		return resolve(event);
	}
	const session = await auth.api.getSession({ headers: event.request.headers });
	event.locals.user = session ? toSessionUser(session.user) : null;
	event.locals.sessionId = event.locals.user ? (session?.session.id ?? null) : null;

	const decision = decideAccess(path, event.locals.user);
	if (decision === 'sign-in') {
		if (isApi(path)) return apiError(401, 'unauthenticated', 'Sign in first: this endpoint needs a session.');
		const next = encodeURIComponent(path + event.url.search);
		return new Response(null, { status: 303, headers: { location: `/sign-in?next=${next}` } });
	}
	if (decision === 'forbidden') {
		const message = `Your role (${event.locals.user?.role}) may not open ${path}.`;
		if (isApi(path)) return apiError(403, 'forbidden', message);
		// Refuse any write outright; for a page view the root layout renders the 403 page.
		if (event.request.method !== 'GET' && event.request.method !== 'HEAD') {
			return new Response(message, { status: 403, headers: { 'content-type': 'text/plain; charset=utf-8' } });
		}
		event.locals.forbidden = message;
	}
	return svelteKitHandler({ event, resolve, auth, building });
};
