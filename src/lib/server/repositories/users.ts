import type { DB } from '../db';
import { isRole } from '../auth/session';
import type { Role } from '../auth/types';

export interface UserRow {
	id: string;
	name: string;
	email: string;
	role: Role | null;
	banned: boolean;
	createdAt: string;
}

export async function listUsers(db: DB): Promise<UserRow[]> {
	const rows = await db.selectFrom('user').select(['id', 'name', 'email', 'role', 'banned', 'createdAt']).orderBy('name').execute();
	return rows.map((r) => ({ ...r, role: isRole(r.role) ? r.role : null, banned: Boolean(r.banned) }));
}

export async function usersWithRole(db: DB, roles: Role[]): Promise<UserRow[]> {
	return (await listUsers(db)).filter((u) => u.role && roles.includes(u.role) && !u.banned);
}
