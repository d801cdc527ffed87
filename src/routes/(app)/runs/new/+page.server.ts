import { fail, redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listBenches, listCells, listResistors, listThermometers } from '$lib/server/repositories/equipment';
import { kindsFor, runSetupSchema, setUpRun } from '$lib/server/runs/setup';
import type { Actions, PageServerLoad } from './$types';

const SETUP_ROLES = ['technician', 'supervisor', 'admin'] as const;

export const load = (async ({ locals }) => {
	requireRole(locals, SETUP_ROLES);
	const { db } = appDatabase();
	const [benches, cells, thermometers, resistors] = await Promise.all([listBenches(db), listCells(db), listThermometers(db), listResistors(db)]);
	return {
		benches: benches.map((b) => ({ id: b.id, name: b.name, heatSource: b.heat_source })),
		cells: cells.filter((c) => c.retired_at === null).map((c) => ({ id: c.id, serial: c.serial, point: c.fixed_point, depthMm: c.immersion_depth_mm, kinds: kindsFor(c.fixed_point) })),
		thermometers: thermometers.filter((t) => t.retired_at === null).map((t) => ({ id: t.id, serial: t.serial, kind: t.kind })),
		resistors: resistors.filter((r) => r.retired_at === null).map((r) => ({ id: r.id, serial: r.serial, nominalOhm: r.nominal_ohm }))
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async ({ locals, request }) => {
		const actor = requireRole(locals, SETUP_ROLES);
		const values = Object.fromEntries(await request.formData());
		const parsed = runSetupSchema.safeParse(values);
		if (!parsed.success) {
			const errors = Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message]));
			return fail(400, { values, errors });
		}
		const outcome = await setUpRun(appDatabase().db, actor, parsed.data);
		if (!outcome.ok) return fail(400, { values, errors: outcome.errors });
		redirect(303, `/runs/${outcome.run.id}`);
	}
} satisfies Actions;
