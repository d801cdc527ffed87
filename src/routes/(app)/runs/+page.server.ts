import { appDatabase } from '$lib/server/db';
import { listBenches, listCells, listThermometers } from '$lib/server/repositories/equipment';
import { parseRunFilter, queryRuns } from '$lib/server/repositories/run-query';
import type { PageServerLoad } from './$types';

export const load = (async ({ url, locals }) => {
	const { db } = appDatabase();
	const { filter, problems } = parseRunFilter(url.searchParams);
	const [result, benches, cells, thermometers] = await Promise.all([queryRuns(db, filter), listBenches(db), listCells(db), listThermometers(db)]);
	return {
		...result,
		filter,
		problems,
		benches: benches.map((b) => ({ id: b.id, name: b.name })),
		cells: cells.map((c) => ({ id: c.id, serial: c.serial, fixed_point: c.fixed_point })),
		thermometers: thermometers.map((t) => ({ id: t.id, serial: t.serial })),
		maySetUp: ['technician', 'supervisor', 'admin'].includes(locals.user!.role),
		mayUpload: ['engineer', 'supervisor', 'admin'].includes(locals.user!.role)
	};
}) satisfies PageServerLoad;
