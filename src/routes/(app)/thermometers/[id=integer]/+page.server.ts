import { error, fail } from '@sveltejs/kit';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listDocuments, removeDocumentOf } from '$lib/server/documents';
import { addRtpwCheck, currentCalibration, getThermometer, rtpwChecks, rtpwCheckSchema, rtpwLimitMilliKelvin, runsOfThermometer } from '$lib/server/repositories/equipment-history';
import { UPLOAD_ROLES } from '$lib/server/upload/roles';
import { assessRtpwStability } from '$lib/history/rtpw';
import type { Actions, PageServerLoad } from './$types';

async function thermometerOr404(id: string) {
	const t = await getThermometer(appDatabase().db, Number(id));
	if (!t) error(404, { message: `Thermometer #${id} does not exist.`, code: 'not_found' });
	return t;
}

export const load = (async ({ locals, params }) => {
	const user = requireUser(locals);
	const { db } = appDatabase();
	const thermometer = await thermometerOr404(params.id);
	const [checks, calibration, runs, limitMilliKelvin, documents] = await Promise.all([rtpwChecks(db, thermometer.id), currentCalibration(db, thermometer.id), runsOfThermometer(db, thermometer.id), rtpwLimitMilliKelvin(db), listDocuments(db, 'thermometer', thermometer.id)]);
	// Reference: the R_TPW the current calibration was computed with; without one, the first check.
	const reference = calibration ? { ohm: calibration.r_tpw_ohm, source: `R_TPW of calibration v${calibration.version}` } : checks[0] ? { ohm: checks[0].r_tpw_ohm, source: 'first R_TPW check' } : null;
	const stability = reference ? assessRtpwStability(checks.map((c) => ({ id: c.id, measuredAtMs: c.measured_at, rTpwOhm: c.r_tpw_ohm })), reference.ohm, limitMilliKelvin) : null;
	return { thermometer, checks, calibration, runs, documents, reference, stability, limitMilliKelvin, canWrite: UPLOAD_ROLES.includes(user.role), mayCalibrate: (['engineer', 'supervisor', 'admin'] as string[]).includes(user.role), nowUtcMinute: new Date().toISOString().slice(0, 16) };
}) satisfies PageServerLoad;

export const actions = {
	addCheck: async ({ locals, params, request }) => {
		const actor = requireRole(locals, UPLOAD_ROLES);
		const thermometer = await thermometerOr404(params.id);
		const form = Object.fromEntries(await request.formData());
		const parsed = rtpwCheckSchema.safeParse(form);
		if (!parsed.success) return fail(400, { action: 'addCheck', message: parsed.error.issues.map((i) => i.message).join(' '), values: form as Record<string, string> });
		await addRtpwCheck(appDatabase().db, actor, thermometer, parsed.data);
		return { action: 'addCheck', done: `R_TPW check of ${parsed.data.rTpwOhm} Ω added.` };
	},
	deleteDocument: async ({ locals, params, request }) => {
		const actor = requireRole(locals, UPLOAD_ROLES);
		const thermometer = await thermometerOr404(params.id);
		const r = await removeDocumentOf(appDatabase().db, actor, 'thermometer', thermometer.id, await request.formData());
		return r.ok ? { action: 'deleteDocument', done: 'Document removed.' } : fail(r.status, { action: 'deleteDocument', message: r.message });
	}
} satisfies Actions;
