import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { calibrationReport, listCalibrations } from '$lib/server/calibration/service';
import { CALIBRATION_VIEW_ROLES, readStep } from '$lib/server/calibration/selection';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals, params, url }) => {
	requireRole(locals, CALIBRATION_VIEW_ROLES, url);
	const { db } = appDatabase();
	const report = await calibrationReport(db, Number(params.id), readStep(url.searchParams.get('step')));
	if (!report) error(404, { message: `Calibration #${params.id} does not exist.`, code: 'not_found' });
	const versions = await listCalibrations(db, report.thermometer.id);
	return { report, versions, stored: url.searchParams.has('stored') };
}) satisfies PageServerLoad;
