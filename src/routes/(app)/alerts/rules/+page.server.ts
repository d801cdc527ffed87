import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { deleteRule, dutyLists, listRules, ruleInputSchema, saveRule, setDuty, setEscalationMinutes } from '$lib/server/alerts/actions';
import { ALERT_KINDS, DEFAULT_PARAMS, KIND_LABELS, KIND_UNITS, PARAM_SCHEMAS } from '$lib/server/alerts/params';
import { getSetting } from '$lib/server/repositories/settings';
import { usersWithRole } from '$lib/server/repositories/users';
import { mailSettings } from '$lib/server/mail/config';
import type { Actions, PageServerLoad } from './$types';

const EDITORS = ['supervisor', 'admin'] as const;

export const load = (async ({ locals }) => {
	requireRole(locals, EDITORS);
	const { db } = appDatabase();
	const kinds = ALERT_KINDS.map((kind) => ({ kind, label: KIND_LABELS[kind], unit: KIND_UNITS[kind], fields: Object.keys(PARAM_SCHEMAS[kind].shape), defaults: DEFAULT_PARAMS[kind] as Record<string, number> }));
	return {
		kinds,
		rules: await listRules(db),
		duty: await dutyLists(db),
		people: (await usersWithRole(db, ['supervisor', 'admin', 'engineer'])).map((u) => ({ id: u.id, name: u.name, role: u.role })),
		escalateAfterMinutes: await getSetting<number>(db, 'alerts.escalateAfterMinutes', mailSettings().escalateAfterMinutes)
	};
}) satisfies PageServerLoad;

export const actions = {
	save: async ({ locals, request }) => {
		const user = requireRole(locals, EDITORS);
		const form = await request.formData();
		const params: Record<string, unknown> = {};
		for (const [k, v] of form) if (k.startsWith('p.') && String(v).trim() !== '') params[k.slice(2)] = String(v).trim();
		const parsed = ruleInputSchema.safeParse({ kind: form.get('kind'), fixedPoint: form.get('fixedPoint') ?? '', enabled: form.get('enabled') === 'on', params });
		if (!parsed.success) return fail(400, { message: parsed.error.issues[0].message });
		const r = await saveRule(appDatabase().db, user, parsed.data);
		return r.ok ? { done: `${KIND_LABELS[parsed.data.kind]} rule saved for ${parsed.data.fixedPoint ?? 'all fixed points'}.` } : fail(400, { message: Object.values(r.errors)[0] });
	},
	remove: async ({ locals, request }) => {
		const user = requireRole(locals, EDITORS);
		const r = await deleteRule(appDatabase().db, user, Number((await request.formData()).get('id')));
		return r.ok ? { done: 'Rule removed; the wider rule or the default applies again.' } : fail(r.status, { message: r.message });
	},
	duty: async ({ locals, request }) => {
		const user = requireRole(locals, EDITORS);
		const form = await request.formData();
		const tier = form.get('tier') === 'second' ? 'second' : 'first';
		const r = await setDuty(appDatabase().db, user, String(form.get('userId') ?? ''), tier, form.get('on') === '1');
		return r.ok ? { done: 'On-duty lists updated.' } : fail(r.status, { message: r.message });
	},
	escalation: async ({ locals, request }) => {
		const user = requireRole(locals, EDITORS);
		const parsed = z.coerce.number().int().min(1).max(1440).safeParse((await request.formData()).get('minutes'));
		if (!parsed.success) return fail(400, { message: 'Give the escalation delay in whole minutes, 1 to 1440 min.' });
		await setEscalationMinutes(appDatabase().db, user, parsed.data);
		return { done: `Escalation after ${parsed.data} min.` };
	}
} satisfies Actions;
