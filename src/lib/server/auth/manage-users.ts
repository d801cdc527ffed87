import { z } from 'zod';
import { APIError } from 'better-auth/api';
import type { DB } from '../db';
import { recordAudit } from '../repositories/audit';
import type { Auth } from './better-auth';
import { ROLES, type SessionUser } from './types';

export const newUserSchema = z.object({
	name: z.string().trim().min(2, 'Give the person’s full name.').max(120),
	email: z.string().trim().toLowerCase().email('That is not an e-mail address.'),
	role: z.enum(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` }),
	password: z.string().min(10, 'Passwords are at least 10 characters.').max(200)
});

export const roleChangeSchema = z.object({
	userId: z.string().min(1),
	role: z.enum(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` })
});

export type ManageResult = { ok: true } | { ok: false; message: string };

function explain(e: unknown): string {
	if (e instanceof APIError) return e.body?.message ?? e.message;
	throw e;
}

// Every change goes through better-auth's admin API (so its own checks apply) and into the audit trail.
export async function createUser(auth: Auth, db: DB, actor: SessionUser, headers: Headers, input: z.infer<typeof newUserSchema>): Promise<ManageResult> {
	try {
		const created = await auth.api.createUser({ body: { email: input.email, password: input.password, name: input.name, role: input.role }, headers });
		await recordAudit(db, { actor, action: 'user.create', objectType: 'user', objectId: created.user.id, summary: `Created ${input.name} <${input.email}> as ${input.role}`, details: { role: input.role } });
		return { ok: true };
	} catch (e) {
		return { ok: false, message: explain(e) };
	}
}

export async function changeRole(auth: Auth, db: DB, actor: SessionUser, headers: Headers, input: z.infer<typeof roleChangeSchema>): Promise<ManageResult> {
	if (input.userId === actor.id && input.role !== 'admin') return { ok: false, message: 'You cannot remove your own admin role; ask another admin.' };
	try {
		await auth.api.setRole({ body: { userId: input.userId, role: input.role }, headers });
		await recordAudit(db, { actor, action: 'user.role', objectType: 'user', objectId: input.userId, summary: `Role set to ${input.role}`, details: { role: input.role } });
		return { ok: true };
	} catch (e) {
		return { ok: false, message: explain(e) };
	}
}

export async function setDisabled(auth: Auth, db: DB, actor: SessionUser, headers: Headers, userId: string, disabled: boolean): Promise<ManageResult> {
	if (userId === actor.id) return { ok: false, message: 'You cannot disable your own account.' };
	try {
		if (disabled) await auth.api.banUser({ body: { userId, banReason: 'Disabled by an admin' }, headers });
		else await auth.api.unbanUser({ body: { userId }, headers });
		await recordAudit(db, { actor, action: disabled ? 'user.disable' : 'user.enable', objectType: 'user', objectId: userId, summary: disabled ? 'Account disabled' : 'Account enabled' });
		return { ok: true };
	} catch (e) {
		return { ok: false, message: explain(e) };
	}
}
