import { ROLES, type Role, type SessionUser } from './types';

export function isRole(value: unknown): value is Role {
	return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/** The slice of better-auth's user that the app carries in `locals`. An unknown role gets no access. */
export function toSessionUser(user: { id: string; email: string; name: string; role?: string | null; banned?: boolean | null }): SessionUser | null {
	if (user.banned || !isRole(user.role)) return null;
	return { id: user.id, email: user.email, name: user.name, role: user.role };
}
