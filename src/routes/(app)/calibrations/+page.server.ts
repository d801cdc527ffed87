import { fail, redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { SUBRANGE_IDS } from '$lib/metrology';
import { listCalibrations, listThermometers, previewCalibration, storeCalibration, TABLE_STEPS_CELSIUS } from '$lib/server/calibration/service';
import { CALIBRATION_STORE_ROLES, CALIBRATION_VIEW_ROLES, readSelection } from '$lib/server/calibration/selection';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	const user = requireRole(locals, CALIBRATION_VIEW_ROLES, url);
	const app = appDatabase();
	const selection = readSelection(url.searchParams);
	const [thermometers, calibrations, preview] = await Promise.all([
		listThermometers(app.db),
		listCalibrations(app.db),
		selection ? previewCalibration(app, selection.thermometerId, selection.subrange, selection.chosen, selection.stepCelsius) : null
	]);
	const nextVersion = selection ? Math.max(0, ...calibrations.filter((c) => c.thermometer_id === selection.thermometerId).map((c) => c.version)) + 1 : null;
	return { thermometers, calibrations, selection, preview, nextVersion, subranges: SUBRANGE_IDS, steps: TABLE_STEPS_CELSIUS, mayStore: CALIBRATION_STORE_ROLES.includes(user.role) };
}) satisfies PageServerLoad;

export const actions = {
	store: async ({ locals, request }) => {
		const actor = requireRole(locals, CALIBRATION_STORE_ROLES);
		const form = await request.formData();
		const s = readSelection(form);
		if (!s) return fail(400, { message: 'Choose a thermometer and a sub-range first.' });
		const notes = String(form.get('notes') ?? '').trim().slice(0, 1000);
		const r = await storeCalibration(appDatabase(), actor, s.thermometerId, s.subrange, s.chosen, notes);
		if (!r.ok) return fail(r.status, { message: r.message });
		redirect(303, `/calibrations/${r.id}?stored=1`);
	}
} satisfies Actions;
