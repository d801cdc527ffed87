import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { immersionOf, immersionTolerance } from '$lib/server/compare';
import { getRunDetail } from '$lib/server/repositories/run-detail';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals, params, url }) => {
	requireRole(locals, ['engineer', 'supervisor', 'admin'], url);
	const { db, sqlite } = appDatabase();
	const run = await getRunDetail(db, Number(params.id));
	if (!run) error(404, { message: `There is no run #${params.id}.`, code: 'not_found' });
	const toleranceMilliKelvin = await immersionTolerance(db);
	const result = await immersionOf(db, sqlite, run.id, toleranceMilliKelvin);
	return { run: { id: run.id, fixed_point: run.fixed_point, kind: run.kind, cell_serial: run.cell_serial, cell_id: run.cell_id, thermometer_serial: run.thermometer_serial, started_at: run.started_at, sensor_depth_m: run.sensor_depth_m }, toleranceMilliKelvin, result };
}) satisfies PageServerLoad;
