import type { DB } from '../db';
import type { AuditEntry } from '../db/schema';
import type { SessionUser } from '../auth/types';

export interface AuditInput {
	actor: SessionUser | { id: null; label: string };
	action: string;
	objectType: string;
	objectId: string | number;
	summary: string;
	details?: unknown;
	atMs?: number;
}

/** Appends to the audit trail (the table refuses updates and deletes). */
export async function recordAudit(db: DB, input: AuditInput): Promise<void> {
	const actorLabel = 'label' in input.actor ? input.actor.label : `${input.actor.name} <${input.actor.email}>`;
	await db
		.insertInto('audit_log')
		.values({
			at: input.atMs ?? Date.now(),
			actor_id: input.actor.id,
			actor_label: actorLabel,
			action: input.action,
			object_type: input.objectType,
			object_id: String(input.objectId),
			summary: input.summary,
			details_json: JSON.stringify(input.details ?? {})
		})
		.execute();
}

export interface AuditQuery {
	objectType?: string;
	objectId?: string;
	text?: string;
	limit?: number;
	beforeId?: number;
}

export async function searchAudit(db: DB, q: AuditQuery): Promise<AuditEntry[]> {
	let query = db.selectFrom('audit_log').selectAll().orderBy('id', 'desc').limit(Math.min(q.limit ?? 100, 500));
	if (q.objectType) query = query.where('object_type', '=', q.objectType);
	if (q.objectId) query = query.where('object_id', '=', q.objectId);
	if (q.beforeId) query = query.where('id', '<', q.beforeId);
	if (q.text) {
		const like = `%${q.text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
		query = query.where((eb) =>
			eb.or([
				eb('summary', 'like', eb.val(like)),
				eb('actor_label', 'like', eb.val(like)),
				eb('action', 'like', eb.val(like))
			])
		);
	}
	return query.execute();
}
