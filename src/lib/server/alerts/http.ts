// Small helpers for the alert API endpoints: the role check in the API's error shape, and a JSON body.

import type { Role, SessionUser } from '../auth/types';
import { apiError } from '../http/api-error';

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
