import { fail, redirect } from '@sveltejs/kit';
import { appAuth } from '$lib/server/auth';
import { signIn, signInSchema } from '$lib/server/auth/sign-in';
import type { Actions, PageServerLoad } from './$types';

function safeNext(next: string | null): string {
	// Only same-site paths: never an open redirect.
	return next && next.startsWith('/') && !next.startsWith('//') ? next : '/benches';
}

export const load = (({ locals, url }) => {
	if (locals.user) redirect(303, safeNext(url.searchParams.get('next')));
	return {};
}) satisfies PageServerLoad;

export const actions = {
	default: async ({ request, url, getClientAddress }) => {
		const form = Object.fromEntries(await request.formData());
		const parsed = signInSchema.safeParse(form);
		const email = typeof form.email === 'string' ? form.email : '';
		if (!parsed.success) {
			const issue = parsed.error.issues[0];
			return fail(400, { email, message: issue.message, field: String(issue.path[0] ?? '') });
		}
		const outcome = await signIn(appAuth(), parsed.data, getClientAddress(), request.headers);
		if (!outcome.ok) return fail(outcome.status, { email, message: outcome.message, field: outcome.field ?? '' });
		redirect(303, safeNext(url.searchParams.get('next')));
	}
} satisfies Actions;
