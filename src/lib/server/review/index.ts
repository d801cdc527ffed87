// The supervisor's review of a completed run: what it shows (the final analysis, the alerts, the
// events, earlier decisions) and the decisions — sign off, send back, and reopen a signed run as a new
// revision. The signed revision's record (with a snapshot of what was signed) is kept, never overwritten.

import type SQLite from 'better-sqlite3';
import { z } from 'zod';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { storedRunAnalysis } from '../analysis/run-analysis';
import { getRunDetail, listRunEvents, runHistory } from '../repositories/run-detail';
import { recordAudit } from '../repositories/audit';
import { alertsForRun } from '../alerts/queries';

export const reviewCommentSchema = z.object({ comment: z.string().trim().max(2000, 'Keep the comment under 2000 characters.') });
export const requiredCommentSchema = z.object({ comment: z.string().trim().min(3, 'Say what needs doing (a few words at least).').max(2000, 'Keep the comment under 2000 characters.') });

export type ReviewOutcome = { ok: true } | { ok: false; status: 404 | 409; message: string };

export async function loadReview(db: DB, sqlite: SQLite.Database, runId: number) {
	const run = await getRunDetail(db, runId);
	if (!run) return null;
	const [events, alerts, decisions, history] = await Promise.all([
		listRunEvents(db, runId),
		alertsForRun(db, runId),
		db.selectFrom('run_review').leftJoin('user', 'user.id', 'run_review.decided_by').select(['run_review.id', 'run_review.revision', 'run_review.decision', 'run_review.comment', 'run_review.decided_at', 'user.name as decided_by_name']).where('run_id', '=', runId).orderBy('run_review.id', 'desc').execute(),
		runHistory(db, runId)
	]);
	const stored = run.state === 'finished' ? storedRunAnalysis(sqlite, runId) : null;
	return { run, events, alerts, decisions, history, stored };
}

async function snapshot(db: DB, runId: number) {
	const [run, events, alerts] = await Promise.all([
		db.selectFrom('run').selectAll().where('id', '=', runId).executeTakeFirstOrThrow(),
		db.selectFrom('run_event').selectAll().where('run_id', '=', runId).orderBy('time_ms').execute(),
		alertsForRun(db, runId)
	]);
	let analysis: unknown = null;
	try {
		const a = run.analysis_json ? (JSON.parse(run.analysis_json) as { analysis?: { result?: unknown; plateau?: unknown; budget?: unknown } }) : null;
		analysis = a?.analysis ? { result: a.analysis.result ?? null, plateau: a.analysis.plateau ?? null, budget: a.analysis.budget ?? null } : null;
	} catch {
		analysis = null;
	}
	const { analysis_json: _omit, ...row } = run;
	void _omit;
	return { run: row, analysis, events, alerts: alerts.map((a) => ({ id: a.id, kind: a.kind, state: a.state, value: a.value, limit: a.limitValue, unit: a.unit, ack: a.ackComment })) };
}

/** Signs the current revision off; the run is then locked. Unacknowledged alerts must be dealt with first. */
export async function signOff(db: DB, sqlite: SQLite.Database, actor: SessionUser, runId: number, comment: string, nowMs = Date.now()): Promise<ReviewOutcome> {
	const run = await db.selectFrom('run').select(['id', 'state', 'review_state', 'revision']).where('id', '=', runId).executeTakeFirst();
	if (!run) return { ok: false, status: 404, message: `Run #${runId} does not exist.` };
	if (run.state !== 'finished') return { ok: false, status: 409, message: `Run #${runId} is ${run.state}; only a finished run can be signed off.` };
	if (run.review_state === 'signed') return { ok: false, status: 409, message: `Revision ${run.revision} of run #${runId} is already signed off.` };
	const raised = await db.selectFrom('alert_event').select('id').where('run_id', '=', runId).where('state', '=', 'raised').execute();
	if (raised.length > 0) return { ok: false, status: 409, message: `Acknowledge the run’s open alert${raised.length > 1 ? 's' : ''} first (${raised.map((a) => `#${a.id}`).join(', ')}).` };
	storedRunAnalysis(sqlite, runId); // make sure the analysis that is signed is the current one
	const snap = await snapshot(db, runId);
	await db.transaction().execute(async (tx) => {
		await tx.insertInto('run_review').values({ run_id: runId, revision: run.revision, decision: 'signed', comment, snapshot_json: JSON.stringify(snap), decided_by: actor.id, decided_at: nowMs }).execute();
		await tx.updateTable('run').set({ review_state: 'signed', signed_by: actor.id, signed_at: nowMs }).where('id', '=', runId).execute();
		await recordAudit(tx, { actor, action: 'run.sign', objectType: 'run', objectId: runId, summary: `Signed off revision ${run.revision} of run #${runId}${comment ? `: ${comment}` : ''}`, atMs: nowMs });
	});
	return { ok: true };
}

/** Sends the run back to the bench with what needs doing; it stays editable. */
export async function sendBack(db: DB, actor: SessionUser, runId: number, comment: string, nowMs = Date.now()): Promise<ReviewOutcome> {
	const run = await db.selectFrom('run').select(['id', 'state', 'review_state', 'revision']).where('id', '=', runId).executeTakeFirst();
	if (!run) return { ok: false, status: 404, message: `Run #${runId} does not exist.` };
	if (run.review_state === 'signed') return { ok: false, status: 409, message: `Run #${runId} is signed off; reopen it as a new revision instead.` };
	if (run.state !== 'finished') return { ok: false, status: 409, message: `Run #${runId} is ${run.state}; only a finished run is reviewed.` };
	const snap = await snapshot(db, runId);
	await db.transaction().execute(async (tx) => {
		await tx.insertInto('run_review').values({ run_id: runId, revision: run.revision, decision: 'returned', comment, snapshot_json: JSON.stringify(snap), decided_by: actor.id, decided_at: nowMs }).execute();
		await tx.updateTable('run').set({ review_state: 'returned' }).where('id', '=', runId).execute();
		await recordAudit(tx, { actor, action: 'run.return', objectType: 'run', objectId: runId, summary: `Sent revision ${run.revision} of run #${runId} back: ${comment}`, atMs: nowMs });
	});
	return { ok: true };
}

/** Reopens a signed run as revision n+1 (the signed revision's record stays as it was). */
export async function reviseSignedRun(db: DB, actor: SessionUser, runId: number, comment: string, nowMs = Date.now()): Promise<ReviewOutcome> {
	const run = await db.selectFrom('run').select(['id', 'review_state', 'revision']).where('id', '=', runId).executeTakeFirst();
	if (!run) return { ok: false, status: 404, message: `Run #${runId} does not exist.` };
	if (run.review_state !== 'signed') return { ok: false, status: 409, message: `Run #${runId} is not signed off; it can be changed as it is.` };
	const next = run.revision + 1;
	await db.transaction().execute(async (tx) => {
		await tx.insertInto('run_review').values({ run_id: runId, revision: next, decision: 'revised', comment, snapshot_json: '{}', decided_by: actor.id, decided_at: nowMs }).execute();
		await tx.updateTable('run').set({ review_state: 'unreviewed', revision: next, signed_by: null, signed_at: null }).where('id', '=', runId).execute();
		await recordAudit(tx, { actor, action: 'run.revise', objectType: 'run', objectId: runId, summary: `Reopened signed run #${runId} as revision ${next}: ${comment}`, atMs: nowMs });
	});
	return { ok: true };
}

/** The signed snapshot of a revision, as it was signed. */
export async function signedSnapshot(db: DB, runId: number, revision: number): Promise<unknown | null> {
	const row = await db.selectFrom('run_review').select('snapshot_json').where('run_id', '=', runId).where('revision', '=', revision).where('decision', '=', 'signed').orderBy('id', 'desc').executeTakeFirst();
	return row ? JSON.parse(row.snapshot_json) : null;
}
