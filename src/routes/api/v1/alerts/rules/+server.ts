import { json } from '@sveltejs/kit';
import { appDatabase } from '$lib/server/db';
import { listRules, ruleInputSchema, saveRule } from '$lib/server/alerts/actions';
import { ALERT_EDITORS, apiRole, jsonBody } from '$lib/server/alerts/http';
import { DEFAULT_PARAMS } from '$lib/server/alerts/params';
import { apiError } from '$lib/server/http/api-error';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals }) => {
	const user = apiRole(locals, ['supervisor', 'engineer', 'admin']);
	if (user instanceof Response) return user;
	return json({ defaults: DEFAULT_PARAMS, rules: await listRules(appDatabase().db) });
};

/** Creates or replaces the rule for a kind and scope: { kind, fixedPoint ('' = all), enabled, params }. */
export const PUT: RequestHandler = async ({ locals, request }) => {
	const user = apiRole(locals, ALERT_EDITORS);
	if (user instanceof Response) return user;
	const body = await jsonBody(request);
	if (body instanceof Response) return body;
	const parsed = ruleInputSchema.safeParse(body);
	if (!parsed.success) return apiError(422, 'invalid_rule', parsed.error.issues[0].message, parsed.error.issues);
	const r = await saveRule(appDatabase().db, user, parsed.data);
	if (!r.ok) return apiError(422, 'invalid_rule', Object.values(r.errors)[0], r.errors);
	return json({ id: r.id });
};
