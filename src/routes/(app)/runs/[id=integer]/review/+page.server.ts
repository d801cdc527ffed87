import { error, fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { loadReview, requiredCommentSchema, reviewCommentSchema, reviseSignedRun, sendBack, signOff } from '$lib/server/review';
import { KIND_LABELS } from '$lib/server/alerts/params';
import type { Actions, PageServerLoad } from './$types';

const REVIEWERS = ['supervisor', 'admin'] as const;

export const load = (async ({ locals, params }) => {
	requireRole(locals, REVIEWERS);
	const { db, sqlite } = appDatabase();
	const review = await loadReview(db, sqlite, Number(params.id));
	if (!review) error(404, { message: `There is no run #${params.id}.` });
	return { ...review, kindLabels: KIND_LABELS };
}) satisfies PageServerLoad;

export const actions = {
	sign: async ({ locals, params, request }) => {
		const user = requireRole(locals, REVIEWERS);
		const parsed = reviewCommentSchema.safeParse({ comment: (await request.formData()).get('comment') ?? '' });
		if (!parsed.success) return fail(400, { message: parsed.error.issues[0].message });
		const { db, sqlite } = appDatabase();
		const r = await signOff(db, sqlite, user, Number(params.id), parsed.data.comment);
		return r.ok ? { done: 'Signed off. The run is locked; a later change makes a new revision.' } : fail(r.status, { message: r.message });
	},
	return: async ({ locals, params, request }) => {
		const user = requireRole(locals, REVIEWERS);
		const parsed = requiredCommentSchema.safeParse({ comment: (await request.formData()).get('comment') ?? '' });
		if (!parsed.success) return fail(400, { message: parsed.error.issues[0].message });
		const r = await sendBack(appDatabase().db, user, Number(params.id), parsed.data.comment);
		return r.ok ? { done: 'Sent back to the bench with your comment.' } : fail(r.status, { message: r.message });
	},
	revise: async ({ locals, params, request }) => {
		const user = requireRole(locals, REVIEWERS);
		const parsed = requiredCommentSchema.safeParse({ comment: (await request.formData()).get('comment') ?? '' });
		if (!parsed.success) return fail(400, { message: parsed.error.issues[0].message });
		const r = await reviseSignedRun(appDatabase().db, user, Number(params.id), parsed.data.comment);
		return r.ok ? { done: 'Reopened as a new revision; the signed revision’s record is kept.' } : fail(r.status, { message: r.message });
	}
} satisfies Actions;
