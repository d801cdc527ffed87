import type { DB } from '../db';
import type { RunState } from '../db/schema';

/** Runs with the names of what they used, newest first. */
export function listRunSummaries(db: DB, opts: { limit?: number; offset?: number; state?: RunState } = {}) {
	let q = db
		.selectFrom('run')
		.innerJoin('bench', 'bench.id', 'run.bench_id')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.leftJoin('user as operator', 'operator.id', 'run.operator_id')
		.select([
			'run.id',
			'run.fixed_point',
			'run.kind',
			'run.state',
			'run.review_state',
			'run.created_at',
			'run.started_at',
			'run.ended_at',
			'run.reading_count',
			'bench.name as bench_name',
			'cell.serial as cell_serial',
			'thermometer.serial as thermometer_serial',
			'operator.name as operator_name'
		])
		.orderBy('run.created_at', 'desc')
		.limit(opts.limit ?? 50)
		.offset(opts.offset ?? 0);
	if (opts.state) q = q.where('run.state', '=', opts.state);
	return q.execute();
}

/** The run currently recording on each bench (at most one, enforced by a unique index). */
export function recordingRunsByBench(db: DB) {
	return db
		.selectFrom('run')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.select(['run.id', 'run.bench_id', 'run.fixed_point', 'run.kind', 'run.started_at', 'run.last_reading_at', 'run.reading_count', 'cell.serial as cell_serial', 'thermometer.serial as thermometer_serial'])
		.where('run.state', '=', 'recording')
		.execute();
}
