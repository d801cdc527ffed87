import { fail } from '@sveltejs/kit';
import { appAuth } from '$lib/server/auth';
import { requireRole } from '$lib/server/auth/guard';
import { changeRole, createUser, newUserSchema, roleChangeSchema, setDisabled } from '$lib/server/auth/manage-users';
import { appDatabase } from '$lib/server/db';
import { listUsers } from '$lib/server/repositories/users';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ locals }) => {
	requireRole(locals, ['admin']);
	return { users: await listUsers(appDatabase().db) };
}) satisfies PageServerLoad;

export const actions = {
	create: async ({ locals, request }) => {
		const actor = requireRole(locals, ['admin']);
		const form = Object.fromEntries(await request.formData());
		const parsed = newUserSchema.safeParse(form);
		if (!parsed.success) return fail(400, { action: 'create', message: parsed.error.issues.map((i) => `${String(i.path[0])}: ${i.message}`).join(' '), values: { ...form, password: '' } });
		const result = await createUser(appAuth(), appDatabase().db, actor, request.headers, parsed.data);
		return result.ok ? { action: 'create', done: `Account made for ${parsed.data.email}.` } : fail(400, { action: 'create', message: result.message, values: { ...form, password: '' } });
	},
	role: async ({ locals, request }) => {
		const actor = requireRole(locals, ['admin']);
		const parsed = roleChangeSchema.safeParse(Object.fromEntries(await request.formData()));
		if (!parsed.success) return fail(400, { action: 'role', message: parsed.error.issues[0].message });
		const result = await changeRole(appAuth(), appDatabase().db, actor, request.headers, parsed.data);
		return result.ok ? { action: 'role', done: 'Role changed.' } : fail(400, { action: 'role', message: result.message });
	},
	disable: async ({ locals, request }) => {
		const actor = requireRole(locals, ['admin']);
		const data = await request.formData();
		const userId = String(data.get('userId') ?? '');
		const disabled = data.get('disabled') === 'true';
		const result = await setDisabled(appAuth(), appDatabase().db, actor, request.headers, userId, disabled);
		return result.ok ? { action: 'disable', done: disabled ? 'Account disabled.' : 'Account enabled.' } : fail(400, { action: 'disable', message: result.message });
	}
} satisfies Actions;
