import { error, fail } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { RUN_TRANSITIONS, RunLifecycleError, transitionRun, type RunTransition } from '$lib/server/repositories/run-lifecycle';
import { EVENT_KINDS, addRunEvent, getRunDetail, listRunEvents, runEventSchema, runHistory } from '$lib/server/repositories/run-detail';
import { loadReductionContext } from '$lib/server/ingest/reduce';
import { ingestService } from '$lib/server/ingest/service';
import { alertsForRun } from '$lib/server/bench-screens/alerts';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ params, locals }) => {
	const user = requireUser(locals);
	const { db } = appDatabase();
	const runId = Number(params.id);
	const run = await getRunDetail(db, runId);
	if (!run) error(404, { message: `There is no run #${runId}.` });
	const [events, history, alerts] = await Promise.all([listRunEvents(db, runId), runHistory(db, runId), alertsForRun(db, runId)]);
	// How the readings are reduced, and the expected sensor temperature the chart is drawn against.
	const ctx = loadReductionContext(appDatabase().sqlite, runId);
	const reduction = { basis: ctx?.basis ?? 'unavailable', problem: ctx?.problem ?? null, expectedKelvin: ctx?.expectedKelvin ?? null, subrange: ctx?.subrange ?? null };
	const detector = run.state === 'recording' ? ingestService().runs.detector(runId) : null;
	// the newest reduced reading, so the page shows it before the next one arrives live
	const latest = run.state === 'recording' ? (ingestService().runs.summaries.get(runId)?.latest ?? null) : null;
	const transitions = Object.entries(RUN_TRANSITIONS)
		.filter(([, t]) => t.from.includes(run.state) && t.roles.includes(user.role) && run.review_state !== 'signed')
		.map(([name]) => name);
	return { run, events, history, transitions, eventKinds: EVENT_KINDS, mayAnnotate: run.review_state !== 'signed', reduction, detector, latest, alerts };
}) satisfies PageServerLoad;

export const actions = {
	transition: async ({ params, locals, request }) => {
		const actor = requireUser(locals);
		const name = String((await request.formData()).get('transition') ?? '');
		if (!(name in RUN_TRANSITIONS)) return fail(400, { message: `Unknown action “${name}”.` });
		try {
			await transitionRun(appDatabase().db, actor, Number(params.id), name as RunTransition);
			return { done: `Run ${RUN_TRANSITIONS[name].to}.` };
		} catch (e) {
			if (e instanceof RunLifecycleError) return fail(e.code === 'forbidden' ? 403 : e.code === 'not_found' ? 404 : 409, { message: e.message });
			throw e;
		}
	},
	event: async ({ params, locals, request }) => {
		const actor = requireUser(locals);
		const parsed = runEventSchema.safeParse(Object.fromEntries(await request.formData()));
		if (!parsed.success) return fail(400, { message: parsed.error.issues[0].message });
		const result = await addRunEvent(appDatabase().db, actor, Number(params.id), parsed.data);
		return result.ok ? { done: `${EVENT_KINDS[parsed.data.kind]} marked.` } : fail(409, { message: result.message });
	}
} satisfies Actions;
