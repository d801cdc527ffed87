import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listBenches, listCells, listResistors, listThermometers } from '$lib/server/repositories/equipment';
import { UPLOAD_ROLES } from '$lib/server/upload/roles';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals }) => {
	requireRole(locals, UPLOAD_ROLES);
	const { db } = appDatabase();
	const [benches, cells, thermometers, resistors] = await Promise.all([listBenches(db), listCells(db), listThermometers(db), listResistors(db)]);
	return {
		benches: benches.map((b) => ({ id: b.id, name: b.name, channel: b.bridge_channel })),
		cells: cells.filter((c) => c.retired_at === null).map((c) => ({ id: c.id, serial: c.serial, fixedPoint: c.fixed_point, immersionDepthMm: c.immersion_depth_mm })),
		thermometers: thermometers.filter((t) => t.retired_at === null).map((t) => ({ id: t.id, serial: t.serial, kind: t.kind })),
		resistors: resistors.filter((r) => r.retired_at === null).map((r) => ({ id: r.id, serial: r.serial, nominalOhm: r.nominal_ohm }))
	};
}) satisfies PageServerLoad;
