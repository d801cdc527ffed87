import { redirect } from '@sveltejs/kit';
import { appAuth } from '$lib/server/auth';
import type { Actions, PageServerLoad } from './$types';

export const load = (() => redirect(303, '/benches')) satisfies PageServerLoad;

export const actions = {
	default: async ({ request }) => {
		await appAuth().api.signOut({ headers: request.headers });
		redirect(303, '/sign-in');
	}
} satisfies Actions;
