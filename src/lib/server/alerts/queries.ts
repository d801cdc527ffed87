// Read side of the alerts: what the inbox, the shell badge, the bench tiles and the run pages show.

import { sql } from 'kysely';
import type { AlertKind, AlertState, AlertSummary } from '$lib/live/protocol';
import type { DB } from '../db';

export const OPEN_STATES: AlertState[] = ['raised', 'noted'];

interface Row {
	id: number;
	kind: string;
	state: string;
	run_id: number | null;
	bench_id: number | null;
	bench_name: string | null;
	fixed_point: string | null;
	message: string;
	value: number | null;
	limit_value: number | null;
	unit: string;
	raised_at: number;
	last_seen_at: number;
	occurrences: number;
	ack_name: string | null;
	acknowledged_at: number | null;
	ack_comment: string | null;
	resolved_at: number | null;
	resolved_name: string | null;
	escalated_at: number | null;
	pending: number;
	sent: number;
	failed: number;
}

function base(db: DB) {
	return db
		.selectFrom('alert_event as a')
		.leftJoin('bench as b', 'b.id', 'a.bench_id')
		.leftJoin('run as r', 'r.id', 'a.run_id')
		.leftJoin('user as ua', 'ua.id', 'a.acknowledged_by')
		.leftJoin('user as ur', 'ur.id', 'a.resolved_by')
		.select([
			'a.id',
			'a.kind',
			'a.state',
			'a.run_id',
			'a.bench_id',
			'b.name as bench_name',
			'r.fixed_point',
			'a.message',
			'a.value',
			'a.limit_value',
			'a.unit',
			'a.raised_at',
			'a.last_seen_at',
			'a.occurrences',
			'ua.name as ack_name',
			'a.acknowledged_at',
			'a.ack_comment',
			'a.resolved_at',
			'ur.name as resolved_name',
			'a.escalated_at',
			sql<number>`(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'pending')`.as('pending'),
			sql<number>`(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'sent')`.as('sent'),
			sql<number>`(select count(*) from alert_delivery d where d.alert_id = a.id and d.state = 'failed')`.as('failed')
		]);
}

export function toSummary(r: Row): AlertSummary {
	return {
		id: String(r.id),
		kind: r.kind as AlertKind,
		state: r.state as AlertState,
		runId: r.run_id === null ? null : String(r.run_id),
		benchId: r.bench_id === null ? null : String(r.bench_id),
		benchName: r.bench_name,
		fixedPoint: r.fixed_point,
		message: r.message,
		value: r.value,
		limitValue: r.limit_value,
		unit: r.unit,
		raisedAtMs: r.raised_at,
		lastSeenAtMs: r.last_seen_at,
		occurrences: r.occurrences,
		acknowledgedBy: r.ack_name,
		acknowledgedAtMs: r.acknowledged_at,
		ackComment: r.ack_comment,
		resolvedAtMs: r.resolved_at,
		resolvedBy: r.resolved_name,
		escalatedAtMs: r.escalated_at,
		delivery: r.failed > 0 ? 'failed' : r.pending > 0 ? 'pending' : r.sent > 0 ? 'sent' : 'none'
	};
}

/** Open alerts (raised or noted) keyed by bench id, newest first: for the bench tiles. */
export async function openAlertsByBench(db: DB): Promise<Map<number, AlertSummary[]>> {
	const rows = (await base(db).where('a.state', 'in', OPEN_STATES).where('a.bench_id', 'is not', null).orderBy('a.raised_at', 'desc').execute()) as Row[];
	const out = new Map<number, AlertSummary[]>();
	for (const r of rows) {
		const list = out.get(r.bench_id!) ?? [];
		list.push(toSummary(r));
		out.set(r.bench_id!, list);
	}
	return out;
}

/** Every alert of a run (open first, then by time, newest first): for the run and review pages. */
export async function alertsForRun(db: DB, runId: number): Promise<AlertSummary[]> {
	const rows = (await base(db)
		.where('a.run_id', '=', runId)
		.orderBy(sql`case when a.state = 'cleared' then 1 else 0 end`)
		.orderBy('a.raised_at', 'desc')
		.execute()) as Row[];
	return rows.map(toSummary);
}

export async function alertById(db: DB, id: number): Promise<AlertSummary | null> {
	const row = (await base(db).where('a.id', '=', id).executeTakeFirst()) as Row | undefined;
	return row ? toSummary(row) : null;
}

export interface InboxQuery {
	/** 'open' = raised + noted */
	state?: 'open' | AlertState | 'all';
	limit?: number;
}

export async function alertInbox(db: DB, q: InboxQuery = {}): Promise<AlertSummary[]> {
	let query = base(db);
	const state = q.state ?? 'open';
	if (state === 'open') query = query.where('a.state', 'in', OPEN_STATES);
	else if (state !== 'all') query = query.where('a.state', '=', state);
	const rows = (await query
		.orderBy(sql`case a.state when 'raised' then 0 when 'noted' then 1 else 2 end`)
		.orderBy('a.last_seen_at', 'desc')
		.limit(Math.min(q.limit ?? 200, 500))
		.execute()) as Row[];
	return rows.map(toSummary);
}

/** The shell badge: open alerts. */
export async function openAlertCount(db: DB): Promise<number> {
	const r = await db.selectFrom('alert_event').select((eb) => eb.fn.countAll<number>().as('n')).where('state', 'in', OPEN_STATES).executeTakeFirst();
	return Number(r?.n ?? 0);
}

export interface DeliveryRow {
	id: number;
	alertId: number;
	reason: string;
	recipients: string[];
	state: string;
	attempts: number;
	nextAttemptAtMs: number;
	lastError: string | null;
	sentAtMs: number | null;
}

/** The e-mails of these alerts (oldest first per alert), for delivery status on /alerts. */
export async function deliveriesFor(db: DB, alertIds: number[]): Promise<Record<string, DeliveryRow[]>> {
	if (alertIds.length === 0) return {};
	const rows = await db.selectFrom('alert_delivery').selectAll().where('alert_id', 'in', alertIds).orderBy('id').execute();
	const out: Record<string, DeliveryRow[]> = {};
	for (const r of rows) {
		(out[String(r.alert_id)] ??= []).push({
			id: r.id,
			alertId: r.alert_id,
			reason: r.reason,
			recipients: JSON.parse(r.recipients_json) as string[],
			state: r.state,
			attempts: r.attempts,
			nextAttemptAtMs: r.next_attempt_at,
			lastError: r.last_error,
			sentAtMs: r.sent_at
		});
	}
	return out;
}
