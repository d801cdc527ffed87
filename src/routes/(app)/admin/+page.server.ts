import { redirect } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';

export const load = (() => redirect(303, '/admin/users')) satisfies PageServerLoad;
