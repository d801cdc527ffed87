// The write side of the alerts, on the raw better-sqlite3 connection: the engine runs on the ingest's
// update path and in its tick, and these are a few small synchronous statements per state change (none
// per reading). Each change is one transaction with its audit entry and, where due, its e-mail in the
// outbox; nothing here waits for the network.

import type SQLite from 'better-sqlite3';
import type { AlertKind, AlertSummary } from '$lib/live/protocol';
import { composeAlertMail } from '../mail/compose';
import { mailSettings } from '../mail/config';
import { onsetAction } from './conditions';
import { KIND_LABELS, KIND_UNITS } from './params';
import { toSummary } from './queries';

export const SYSTEM_ACTOR = 'Stillpoint alerts';

const SUMMARY_SQL = `select a.id, a.kind, a.state, a.run_id, a.bench_id, b.name as bench_name, r.fixed_point, a.message, a.value, a.limit_value,
	a.unit, a.raised_at, a.last_seen_at, a.occurrences, ua.name as ack_name, a.acknowledged_at, a.ack_comment, a.resolved_at,
	ur.name as resolved_name, a.escalated_at,
	(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'pending') as pending,
	(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'sent') as sent,
	(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'failed') as failed
	from alert_event a left join bench b on b.id = a.bench_id left join run r on r.id = a.run_id
	left join "user" ua on ua.id = a.acknowledged_by left join "user" ur on ur.id = a.resolved_by where a.id = ?`;

export interface Onset {
	kind: AlertKind;
	runId: number;
	benchId: number | null;
	ruleId: number | null;
	message: string;
	value: number | null;
	limitValue: number | null;
	holdOffMs: number;
	nowMs: number;
}

export function dedupeKey(runId: number, kind: AlertKind): string {
	return `run:${runId}:${kind}`;
}

export class AlertStore {
	private readonly stmts;

	constructor(
		readonly sqlite: SQLite.Database,
		private readonly env: NodeJS.ProcessEnv = process.env
	) {
		const p = <T = unknown>(s: string) => sqlite.prepare<unknown[], T>(s);
		this.stmts = {
			latest: p<{ id: number; state: string; resolved_at: number | null }>('select id, state, resolved_at from alert_event where dedupe_key = ? order by id desc limit 1'),
			insert: p(
				"insert into alert_event (rule_id, run_id, bench_id, kind, state, message, value, limit_value, unit, raised_at, last_seen_at, dedupe_key) values (?, ?, ?, ?, 'raised', ?, ?, ?, ?, ?, ?, ?)"
			),
			reopen: p("update alert_event set state = 'raised', occurrences = occurrences + 1, reopened_at = ?, last_seen_at = ?, resolved_at = null, resolved_by = null, cleared_by_condition = 0, escalated_at = null, message = ?, value = ?, limit_value = ? where id = ?"),
			touch: p('update alert_event set last_seen_at = ?, value = ? where id = ?'),
			clear: p("update alert_event set state = 'cleared', resolved_at = ?, resolved_by = null, cleared_by_condition = 1, last_seen_at = ? where id = ? and state in ('raised','noted')"),
			summary: p(SUMMARY_SQL),
			audit: p("insert into audit_log (at, actor_id, actor_label, action, object_type, object_id, summary, details_json) values (?, null, ?, ?, 'alert', ?, ?, ?)"),
			outbox: p("insert into alert_delivery (alert_id, reason, recipients_json, subject, body_text, state, next_attempt_at, created_at) values (?, ?, ?, ?, ?, 'pending', ?, ?)"),
			escalated: p('update alert_event set escalated_at = ? where id = ?'),
			firstDuty: p<{ email: string }>("select u.email from alert_duty d join \"user\" u on u.id = d.user_id where d.tier = 'first' and coalesce(u.banned, 0) = 0"),
			secondDuty: p<{ email: string }>("select u.email from alert_duty d join \"user\" u on u.id = d.user_id where d.tier = 'second' and coalesce(u.banned, 0) = 0"),
			byRole: p<{ email: string }>('select email from "user" where role = ? and coalesce(banned, 0) = 0'),
			operator: p<{ email: string }>('select u.email from run join "user" u on u.id = run.operator_id where run.id = ?'),
			what: p<{ kind: AlertKind; run_id: number | null }>('select kind, run_id from alert_event where id = ?'),
			openForRun: p<{ id: number; kind: string }>("select id, kind from alert_event where run_id = ? and state in ('raised','noted')")
		};
	}

	summary(id: number): AlertSummary | null {
		const row = this.stmts.summary.get(id) as Parameters<typeof toSummary>[0] | undefined;
		return row ? toSummary(row) : null;
	}

	/** A condition came on: a new alert, the same one touched, or the same one reopened (flapping). */
	onset(o: Onset): { id: number; action: 'create' | 'touch' | 'reopen' } {
		const key = dedupeKey(o.runId, o.kind);
		return this.sqlite.transaction(() => {
			const latest = this.stmts.latest.get(key);
			const act = onsetAction(latest ? { id: latest.id, state: latest.state, resolvedAtMs: latest.resolved_at } : null, o.nowMs, o.holdOffMs);
			const unit = KIND_UNITS[o.kind];
			if (act.do === 'touch') {
				this.stmts.touch.run(o.nowMs, o.value, act.id);
				return { id: act.id, action: 'touch' as const };
			}
			if (act.do === 'reopen') {
				this.stmts.reopen.run(o.nowMs, o.nowMs, o.message, o.value, o.limitValue, act.id);
				this.audit('alert.reopen', act.id, `${KIND_LABELS[o.kind]} on run #${o.runId} came back within the hold-off: same alert reopened`, { value: o.value, limit: o.limitValue, unit }, o.nowMs);
				return { id: act.id, action: 'reopen' as const };
			}
			const id = Number(this.stmts.insert.run(o.ruleId, o.runId, o.benchId, o.kind, o.message, o.value, o.limitValue, unit, o.nowMs, o.nowMs, key).lastInsertRowid);
			this.audit('alert.raise', id, `${KIND_LABELS[o.kind]} raised on run #${o.runId}: ${o.message}`, { value: o.value, limit: o.limitValue, unit, ruleId: o.ruleId }, o.nowMs);
			this.enqueue(id, 'raised', this.firstRecipients(o.runId), o.nowMs);
			return { id, action: 'create' as const };
		})();
	}

	/** Keeps the alert's value and last-seen time current (the engine throttles this). */
	touch(id: number, value: number | null, nowMs: number): void {
		this.stmts.touch.run(nowMs, value, id);
	}

	/** The condition went away (hysteresis satisfied): the alert clears by itself. */
	clear(id: number, nowMs: number, why: string): boolean {
		return this.sqlite.transaction(() => {
			if (this.stmts.clear.run(nowMs, nowMs, id).changes === 0) return false;
			this.audit('alert.clear', id, `${this.describe(id)} cleared by itself: ${why}`, {}, nowMs);
			return true;
		})();
	}

	latestOpen(runId: number, kind: AlertKind): number | null {
		const latest = this.stmts.latest.get(dedupeKey(runId, kind));
		return latest && latest.state !== 'cleared' ? latest.id : null;
	}

	openForRun(runId: number): { id: number; kind: AlertKind }[] {
		return this.stmts.openForRun.all(runId).map((r) => ({ id: r.id, kind: r.kind as AlertKind }));
	}

	escalate(id: number, nowMs: number, afterMinutes: number): void {
		this.sqlite.transaction(() => {
			this.stmts.escalated.run(nowMs, id);
			this.audit('alert.escalate', id, `${this.describe(id)} not acknowledged within ${afterMinutes} min: sent to the escalation list`, {}, nowMs);
			this.enqueue(id, 'escalated', this.secondRecipients(), nowMs, afterMinutes);
		})();
	}

	/** The supervisors on the first list (all supervisors when the list is empty) and the run's technician. */
	firstRecipients(runId: number): string[] {
		let list = this.stmts.firstDuty.all().map((r) => r.email);
		if (list.length === 0) list = this.stmts.byRole.all('supervisor').map((r) => r.email);
		const op = this.stmts.operator.get(runId)?.email;
		return [...new Set([...list, ...(op ? [op] : [])])];
	}

	/** The second list; else the addresses in STILLPOINT_ALERT_ESCALATE_TO; else the admins. */
	secondRecipients(): string[] {
		let list = this.stmts.secondDuty.all().map((r) => r.email);
		if (list.length === 0) list = (this.env.STILLPOINT_ALERT_ESCALATE_TO ?? '').split(',').map((s) => s.trim()).filter(Boolean);
		if (list.length === 0) list = this.stmts.byRole.all('admin').map((r) => r.email);
		return [...new Set(list)];
	}

	private enqueue(alertId: number, reason: 'raised' | 'reopened' | 'escalated', recipients: string[], nowMs: number, escalateAfterMinutes?: number): void {
		if (recipients.length === 0) return;
		const s = this.summary(alertId);
		if (!s) return;
		const mail = composeAlertMail({
			alertId,
			reason,
			kindLabel: KIND_LABELS[s.kind],
			message: s.message,
			value: s.value,
			limitValue: s.limitValue,
			unit: s.unit,
			runId: s.runId === null ? null : Number(s.runId),
			benchName: s.benchName,
			fixedPoint: s.fixedPoint,
			raisedAtMs: s.raisedAtMs,
			publicUrl: mailSettings(this.env).publicUrl,
			escalateAfterMinutes
		});
		this.stmts.outbox.run(alertId, reason, JSON.stringify(recipients), mail.subject, mail.text, nowMs, nowMs);
	}

	/** "Plateau drift on run #41 (alert #7)", for the audit trail (searchable by run). */
	private describe(id: number): string {
		const w = this.stmts.what.get(id);
		return w ? `${KIND_LABELS[w.kind]} on run #${w.run_id} (alert #${id})` : `Alert #${id}`;
	}

	private audit(action: string, alertId: number, summary: string, details: unknown, nowMs: number): void {
		this.stmts.audit.run(nowMs, SYSTEM_ACTOR, action, String(alertId), summary, JSON.stringify(details));
	}
}
