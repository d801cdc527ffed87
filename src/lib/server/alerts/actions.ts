// What people do to alerts (acknowledge with a comment, close by hand) and to the alert set-up (rules,
// on-duty lists, escalation delay). Every change lands in the audit trail.

import { z } from 'zod';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from '../repositories/audit';
import { putSetting } from '../repositories/settings';
import { alertEngine } from './engine';
import { ALERT_KINDS, cleanParams, KIND_LABELS, PARAM_SCHEMAS, type RuleRow } from './params';

export type ActionOutcome = { ok: true } | { ok: false; status: 400 | 404 | 409; message: string };

export const commentSchema = z.object({ comment: z.string().trim().min(3, 'Say in a few words what you are doing about it.').max(1000, 'Keep the comment under 1000 characters.') });

async function changed(id: number): Promise<void> {
	alertEngine()?.changed(id);
}

/** raised → noted: a supervisor takes it on, saying how. */
export async function acknowledgeAlert(db: DB, actor: SessionUser, id: number, comment: string, nowMs = Date.now()): Promise<ActionOutcome> {
	const alert = await db.selectFrom('alert_event').select(['id', 'state', 'kind', 'run_id']).where('id', '=', id).executeTakeFirst();
	if (!alert) return { ok: false, status: 404, message: `Alert #${id} does not exist.` };
	if (alert.state !== 'raised') return { ok: false, status: 409, message: alert.state === 'noted' ? `Alert #${id} is already acknowledged.` : `Alert #${id} is cleared; there is nothing to acknowledge.` };
	await db.transaction().execute(async (tx) => {
		await tx.updateTable('alert_event').set({ state: 'noted', acknowledged_by: actor.id, acknowledged_at: nowMs, ack_comment: comment }).where('id', '=', id).execute();
		await recordAudit(tx, { actor, action: 'alert.acknowledge', objectType: 'alert', objectId: id, summary: `Acknowledged ${KIND_LABELS[alert.kind as keyof typeof KIND_LABELS] ?? alert.kind} on run #${alert.run_id}: ${comment}`, atMs: nowMs });
	});
	await changed(id);
	return { ok: true };
}

/** raised/noted → cleared by a person (the condition may still hold; it reopens if it comes back). */
export async function resolveAlert(db: DB, actor: SessionUser, id: number, comment: string, nowMs = Date.now()): Promise<ActionOutcome> {
	const alert = await db.selectFrom('alert_event').select(['id', 'state', 'kind', 'run_id']).where('id', '=', id).executeTakeFirst();
	if (!alert) return { ok: false, status: 404, message: `Alert #${id} does not exist.` };
	if (alert.state === 'cleared') return { ok: false, status: 409, message: `Alert #${id} is already cleared.` };
	await db.transaction().execute(async (tx) => {
		await tx
			.updateTable('alert_event')
			.set({ state: 'cleared', resolved_by: actor.id, resolved_at: nowMs, cleared_by_condition: 0, ...(alert.state === 'raised' ? { acknowledged_by: actor.id, acknowledged_at: nowMs, ack_comment: comment } : {}) })
			.where('id', '=', id)
			.execute();
		await recordAudit(tx, { actor, action: 'alert.resolve', objectType: 'alert', objectId: id, summary: `Closed alert #${id} by hand: ${comment}`, atMs: nowMs });
	});
	await changed(id);
	return { ok: true };
}

export async function listRules(db: DB): Promise<RuleRow[]> {
	const rows = await db.selectFrom('alert_rule').selectAll().orderBy('kind').orderBy('fixed_point').execute();
	return rows.map((r) => ({ id: r.id, kind: r.kind, fixedPoint: r.fixed_point, runId: r.run_id, params: JSON.parse(r.params_json) as Record<string, unknown>, enabled: r.enabled === 1 }));
}

const FIXED_POINTS = ['Ar', 'Hg', 'TPW', 'Ga', 'In', 'Sn', 'Zn', 'Al', 'Ag'] as const;

/** A rule as the form sends it: kind, scope (all points or one), enabled, and any of the kind's fields. */
export const ruleInputSchema = z.object({
	kind: z.enum(ALERT_KINDS),
	fixedPoint: z.union([z.enum(FIXED_POINTS), z.literal('')]).transform((v) => (v === '' ? null : v)),
	enabled: z.boolean(),
	params: z.record(z.string(), z.unknown())
});
export type RuleInput = z.input<typeof ruleInputSchema>;

/** Creates or updates the rule for (kind, scope); fields left empty fall back to the wider rule or the default. */
export async function saveRule(db: DB, actor: SessionUser, input: z.infer<typeof ruleInputSchema>, nowMs = Date.now()): Promise<{ ok: true; id: number } | { ok: false; errors: Record<string, string> }> {
	const shape = PARAM_SCHEMAS[input.kind].shape as Record<string, z.ZodType>;
	const errors: Record<string, string> = {};
	const given = Object.fromEntries(Object.entries(input.params).filter(([k, v]) => k in shape && v !== '' && v !== null && v !== undefined));
	for (const [k, v] of Object.entries(given)) if (!shape[k].safeParse(v).success) errors[k] = `${k}: ${String(v)} is not an allowed value.`;
	if (Object.keys(errors).length) return { ok: false, errors };
	const params = cleanParams(input.kind, given);
	const existing = await db
		.selectFrom('alert_rule')
		.select(['id', 'params_json', 'enabled'])
		.where('kind', '=', input.kind)
		.where('run_id', 'is', null)
		.where('fixed_point', input.fixedPoint === null ? 'is' : '=', input.fixedPoint)
		.executeTakeFirst();
	const scope = input.fixedPoint ?? 'all fixed points';
	return db.transaction().execute(async (tx) => {
		let id: number;
		if (existing) {
			await tx.updateTable('alert_rule').set({ params_json: JSON.stringify(params), enabled: input.enabled ? 1 : 0, updated_at: nowMs }).where('id', '=', existing.id).execute();
			id = existing.id;
		} else {
			id = (
				await tx
					.insertInto('alert_rule')
					.values({ kind: input.kind, fixed_point: input.fixedPoint, run_id: null, params_json: JSON.stringify(params), enabled: input.enabled ? 1 : 0, created_by: actor.id, created_at: nowMs, updated_at: nowMs })
					.returning('id')
					.executeTakeFirstOrThrow()
			).id;
		}
		await recordAudit(tx, {
			actor,
			action: existing ? 'rule.update' : 'rule.create',
			objectType: 'rule',
			objectId: id,
			summary: `${KIND_LABELS[input.kind]} for ${scope}: ${input.enabled ? 'on' : 'off'}${Object.keys(params).length ? `, ${Object.entries(params).map(([k, v]) => `${k} ${v}`).join(', ')}` : ''}`,
			details: { before: existing ? { params: JSON.parse(existing.params_json), enabled: existing.enabled === 1 } : null, after: { params, enabled: input.enabled } },
			atMs: nowMs
		});
		return { ok: true as const, id };
	});
}

export async function deleteRule(db: DB, actor: SessionUser, id: number): Promise<ActionOutcome> {
	const rule = await db.selectFrom('alert_rule').selectAll().where('id', '=', id).executeTakeFirst();
	if (!rule) return { ok: false, status: 404, message: `Rule #${id} does not exist.` };
	await db.transaction().execute(async (tx) => {
		await tx.deleteFrom('alert_rule').where('id', '=', id).execute();
		await recordAudit(tx, { actor, action: 'rule.delete', objectType: 'rule', objectId: id, summary: `Removed the ${KIND_LABELS[rule.kind]} rule for ${rule.fixed_point ?? 'all fixed points'}`, details: rule });
	});
	return { ok: true };
}

export async function dutyLists(db: DB) {
	return db
		.selectFrom('alert_duty')
		.innerJoin('user', 'user.id', 'alert_duty.user_id')
		.select(['alert_duty.user_id', 'alert_duty.tier', 'user.name', 'user.email', 'user.role'])
		.orderBy('user.name')
		.execute();
}

export async function setDuty(db: DB, actor: SessionUser, userId: string, tier: 'first' | 'second', on: boolean): Promise<ActionOutcome> {
	const user = await db.selectFrom('user').select(['id', 'name']).where('id', '=', userId).executeTakeFirst();
	if (!user) return { ok: false, status: 404, message: 'No such person.' };
	await db.transaction().execute(async (tx) => {
		if (on) await tx.insertInto('alert_duty').values({ user_id: userId, tier, added_by: actor.id, added_at: Date.now() }).onConflict((oc) => oc.doNothing()).execute();
		else await tx.deleteFrom('alert_duty').where('user_id', '=', userId).where('tier', '=', tier).execute();
		await recordAudit(tx, { actor, action: on ? 'alerts.duty.add' : 'alerts.duty.remove', objectType: 'user', objectId: userId, summary: `${user.name} ${on ? 'added to' : 'removed from'} the ${tier === 'first' ? 'on-duty' : 'escalation'} list` });
	});
	return { ok: true };
}

export async function setEscalationMinutes(db: DB, actor: SessionUser, minutes: number): Promise<void> {
	await putSetting(db, 'alerts.escalateAfterMinutes', minutes);
	await recordAudit(db, { actor, action: 'rule.escalation', objectType: 'rule', objectId: 'escalation', summary: `Unacknowledged alerts go to the escalation list after ${minutes} min` });
}
