import { error } from '@sveltejs/kit';
import type { LayoutServerLoad } from './$types';

export const load = (({ locals }) => {
	// `handle` decided this role may not open the page: render the 403 page instead of the content.
	if (locals.forbidden) error(403, { message: locals.forbidden, code: 'forbidden' });
	return { user: locals.user };
}) satisfies LayoutServerLoad;
