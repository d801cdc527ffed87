import { z } from 'zod';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from './audit';

export function getRunDetail(db: DB, runId: number) {
	return db
		.selectFrom('run')
		.innerJoin('bench', 'bench.id', 'run.bench_id')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.innerJoin('standard_resistor as resistor', 'resistor.id', 'run.resistor_id')
		.leftJoin('user as operator', 'operator.id', 'run.operator_id')
		.leftJoin('user as signer', 'signer.id', 'run.signed_by')
		.selectAll('run')
		.select([
			'bench.name as bench_name',
			'cell.serial as cell_serial',
			'cell.purity_statement as cell_purity',
			'cell.purity_percent as cell_purity_percent',
			'thermometer.serial as thermometer_serial',
			'thermometer.kind as thermometer_kind',
			'resistor.serial as resistor_serial',
			'resistor.nominal_ohm as resistor_nominal_ohm',
			'operator.name as operator_name',
			'signer.name as signer_name'
		])
		.where('run.id', '=', runId)
		.executeTakeFirst();
}

export function listRunEvents(db: DB, runId: number) {
	return db
		.selectFrom('run_event')
		.leftJoin('user', 'user.id', 'run_event.created_by')
		.select(['run_event.id', 'run_event.time_ms', 'run_event.kind', 'run_event.note', 'user.name as author'])
		.where('run_event.run_id', '=', runId)
		.orderBy('run_event.time_ms')
		.execute();
}

/** The marks a technician puts on a run with one click; `note` is free text. */
export const EVENT_KINDS = {
	'nucleation-induced': 'Nucleation induced',
	'inner-interface-formed': 'Inner interface formed',
	'current-changed': 'Current changed',
	'thermometer-moved': 'Thermometer moved',
	'furnace-setpoint-changed': 'Furnace set point changed',
	note: 'Note'
} as const;

export const runEventSchema = z.object({
	kind: z.enum(Object.keys(EVENT_KINDS) as [keyof typeof EVENT_KINDS, ...(keyof typeof EVENT_KINDS)[]], { message: 'Unknown kind of event.' }),
	note: z.string().trim().max(500, 'Keep a note under 500 characters.').default('')
}).refine((e) => e.kind !== 'note' || e.note.length > 0, { message: 'A note needs some text.', path: ['note'] });

export async function addRunEvent(db: DB, actor: SessionUser, runId: number, input: z.infer<typeof runEventSchema>, timeMs = Date.now()): Promise<{ ok: true } | { ok: false; message: string }> {
	const run = await db.selectFrom('run').select(['state', 'review_state']).where('id', '=', runId).executeTakeFirst();
	if (!run) return { ok: false, message: `Run #${runId} does not exist.` };
	if (run.review_state === 'signed') return { ok: false, message: 'This run is signed off and locked; events can no longer be added.' };
	await db.insertInto('run_event').values({ run_id: runId, time_ms: timeMs, kind: input.kind, note: input.note, created_by: actor.id, created_at: Date.now() }).execute();
	await recordAudit(db, { actor, action: 'run.event', objectType: 'run', objectId: runId, summary: `${EVENT_KINDS[input.kind]}${input.note ? `: ${input.note}` : ''}` });
	return { ok: true };
}

/** Who did what to this run, from the audit trail. */
export function runHistory(db: DB, runId: number) {
	return db.selectFrom('audit_log').selectAll().where('object_type', '=', 'run').where('object_id', '=', String(runId)).orderBy('id').execute();
}
