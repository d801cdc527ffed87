// Small helpers for the alert API endpoints: the role check in the API's error shape, and a JSON body.

import { json } from '@sveltejs/kit';
import type { Role, SessionUser } from '../auth/types';
import type { DB } from '../db';
import { apiError } from '../http/api-error';
import { commentSchema } from './actions';
import { alertById } from './queries';

export const ALERT_EDITORS: readonly Role[] = ['supervisor', 'admin'];

/** The user if their role is one of `roles`; otherwise the 401/403 answer to return. */
export function apiRole(locals: App.Locals, roles: readonly Role[]): SessionUser | Response {
	const user = locals.user;
	if (!user) return apiError(401, 'unauthenticated', 'Sign in first: this endpoint needs a session.');
	if (!roles.includes(user.role)) return apiError(403, 'forbidden', `This needs the ${roles.join(' or ')} role; you are signed in as ${user.role}.`);
	return user;
}

export async function jsonBody(request: Request): Promise<Record<string, unknown> | Response> {
	try {
		const body = (await request.json()) as unknown;
		if (body && typeof body === 'object' && !Array.isArray(body)) return body as Record<string, unknown>;
	} catch {
		/* answered below */
	}
	return apiError(400, 'invalid_body', 'Send a JSON object.');
}

type CommentAction = (db: DB, user: SessionUser, alertId: number, comment: string) => Promise<{ ok: true } | { ok: false; status: number; message: string }>;

/** POST /api/v1/alerts/{id}/acknowledge and /resolve: supervisor or admin, a JSON comment, the alert back. */
export async function commentedAlertAction(db: DB, locals: App.Locals, alertId: number, request: Request, action: CommentAction): Promise<Response> {
	const user = apiRole(locals, ALERT_EDITORS);
	if (user instanceof Response) return user;
	const body = await jsonBody(request);
	if (body instanceof Response) return body;
	const parsed = commentSchema.safeParse(body);
	if (!parsed.success) return apiError(422, 'invalid_comment', parsed.error.issues[0].message);
	const r = await action(db, user, alertId, parsed.data.comment);
	if (!r.ok) return apiError(r.status, r.status === 404 ? 'not_found' : 'conflict', r.message);
	return json({ alert: await alertById(db, alertId) });
}
