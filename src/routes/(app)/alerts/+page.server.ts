import { fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { acknowledgeAlert, commentSchema, resolveAlert } from '$lib/server/alerts/actions';
import { alertInbox, deliveriesFor } from '$lib/server/alerts/queries';
import { KIND_LABELS } from '$lib/server/alerts/params';
import type { Actions, PageServerLoad } from './$types';

const VIEWS = ['open', 'cleared', 'all'] as const;

export const load = (async ({ locals, url }) => {
	const user = requireRole(locals, ['supervisor', 'engineer', 'admin']);
	const view = VIEWS.find((v) => v === url.searchParams.get('view')) ?? 'open';
	const { db } = appDatabase();
	const alerts = await alertInbox(db, { state: view });
	const focus = Number(url.searchParams.get('alert')) || null;
	return {
		view,
		alerts,
		focus,
		deliveries: await deliveriesFor(db, alerts.map((a) => Number(a.id))),
		kindLabels: KIND_LABELS,
		mayAct: user.role === 'supervisor' || user.role === 'admin'
	};
}) satisfies PageServerLoad;

async function act(locals: App.Locals, request: Request, what: 'acknowledge' | 'resolve') {
	const user = requireRole(locals, ['supervisor', 'admin']);
	const form = await request.formData();
	const id = Number(form.get('id'));
	const parsed = commentSchema.safeParse({ comment: form.get('comment') ?? '' });
	if (!parsed.success) return fail(400, { id, message: parsed.error.issues[0].message });
	const r = await (what === 'acknowledge' ? acknowledgeAlert : resolveAlert)(appDatabase().db, user, id, parsed.data.comment);
	return r.ok ? { id, done: what === 'acknowledge' ? `Alert #${id} acknowledged.` : `Alert #${id} closed.` } : fail(r.status, { id, message: r.message });
}

export const actions = {
	acknowledge: ({ locals, request }) => act(locals, request, 'acknowledge'),
	resolve: ({ locals, request }) => act(locals, request, 'resolve')
} satisfies Actions;
