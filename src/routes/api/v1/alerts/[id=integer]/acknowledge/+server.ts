import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { acknowledgeAlert, commentSchema } from '$lib/server/alerts/actions';
import { ALERT_EDITORS, apiRole, jsonBody } from '$lib/server/alerts/http';
import { alertById } from '$lib/server/alerts/queries';
import { apiError } from '$lib/server/http/api-error';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = async ({ locals, params, request }) => {
	const user = apiRole(locals, ALERT_EDITORS);
	if (user instanceof Response) return user;
	const body = await jsonBody(request);
	if (body instanceof Response) return body;
	const parsed = commentSchema.safeParse(body);
	if (!parsed.success) return apiError(422, 'invalid_comment', parsed.error.issues[0].message);
	const { db } = appDatabase();
	const r = await acknowledgeAlert(db, user, Number(params.id), parsed.data.comment);
	if (!r.ok) return apiError(r.status, r.status === 404 ? 'not_found' : 'conflict', r.message);
	return json({ alert: await alertById(db, Number(params.id)) });
};
