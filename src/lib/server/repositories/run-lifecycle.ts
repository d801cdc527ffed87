import type { DB } from '../db';
import type { NewRun, Run, RunState } from '../db/schema';
import type { Role, SessionUser } from '../auth/types';
import { recordAudit } from './audit';

/**
 * The run's states and who may move it between them:
 *   setup ──start──► recording ──finish──► finished
 *     └──────────────────┴──abandon──► abandoned
 * A finished run may be reopened for more readings by a supervisor until it is signed off.
 */
export const RUN_TRANSITIONS: Record<string, { from: RunState[]; to: RunState; roles: Role[] }> = {
	start: { from: ['setup'], to: 'recording', roles: ['technician', 'supervisor', 'admin'] },
	finish: { from: ['recording'], to: 'finished', roles: ['technician', 'supervisor', 'admin'] },
	abandon: { from: ['setup', 'recording'], to: 'abandoned', roles: ['technician', 'supervisor', 'admin'] },
	reopen: { from: ['finished'], to: 'recording', roles: ['supervisor', 'admin'] }
};
export type RunTransition = keyof typeof RUN_TRANSITIONS;

export class RunLifecycleError extends Error {
	constructor(
		readonly code: 'not_found' | 'forbidden' | 'invalid_transition' | 'bench_busy' | 'locked',
		message: string
	) {
		super(message);
	}
}

export async function createRun(db: DB, actor: SessionUser, input: Omit<NewRun, 'created_at' | 'created_by' | 'state'>): Promise<Run> {
	const run = await db
		.insertInto('run')
		.values({ ...input, created_at: Date.now(), created_by: actor.id, state: 'setup' })
		.returningAll()
		.executeTakeFirstOrThrow();
	await recordAudit(db, { actor, action: 'run.create', objectType: 'run', objectId: run.id, summary: `Set up run #${run.id}: ${run.fixed_point} ${run.kind}`, details: input });
	return run;
}

export async function transitionRun(db: DB, actor: SessionUser, runId: number, transition: RunTransition, nowMs = Date.now()): Promise<Run> {
	const rule = RUN_TRANSITIONS[transition];
	if (!rule) throw new RunLifecycleError('invalid_transition', `Unknown transition ${transition}.`);
	if (!rule.roles.includes(actor.role)) throw new RunLifecycleError('forbidden', `The ${actor.role} role may not ${transition} a run.`);
	return db.transaction().execute(async (tx) => {
		const run = await tx.selectFrom('run').selectAll().where('id', '=', runId).executeTakeFirst();
		if (!run) throw new RunLifecycleError('not_found', `Run #${runId} does not exist.`);
		if (run.review_state === 'signed') throw new RunLifecycleError('locked', `Run #${runId} is signed off and locked.`);
		if (!rule.from.includes(run.state)) {
			throw new RunLifecycleError('invalid_transition', `Run #${runId} is ${run.state}; it can ${transition} only from ${rule.from.join(' or ')}.`);
		}
		if (rule.to === 'recording') {
			const busy = await tx.selectFrom('run').select('id').where('bench_id', '=', run.bench_id).where('state', '=', 'recording').executeTakeFirst();
			if (busy) throw new RunLifecycleError('bench_busy', `Run #${busy.id} is already recording on this bench.`);
		}
		const times = rule.to === 'recording' ? { started_at: run.started_at ?? nowMs, ended_at: null } : { ended_at: nowMs };
		const updated = await tx.updateTable('run').set({ state: rule.to, ...times }).where('id', '=', runId).returningAll().executeTakeFirstOrThrow();
		await recordAudit(tx, { actor, action: `run.${transition}`, objectType: 'run', objectId: runId, summary: `Run #${runId}: ${run.state} → ${rule.to}`, atMs: nowMs });
		return updated;
	});
}
