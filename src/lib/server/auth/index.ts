import { getRequestEvent } from '$app/server';
import { appDatabase } from '../db';
import { authSecret } from './secret';
import { createAuth, type Auth } from './better-auth';

export { ROLES, type Role, type SessionUser } from './types';

const KEY = Symbol.for('stillpoint.auth');
type WithAuth = typeof globalThis & { [KEY]?: Auth };

/** The process-wide better-auth instance on the app database. */
export function appAuth(): Auth {
	const g = globalThis as WithAuth;
	if (!g[KEY]) {
		const { db, path } = appDatabase();
		g[KEY] = createAuth({ db, secret: authSecret(path), baseURL: process.env.ORIGIN, getRequestEvent });
	}
	return g[KEY]!;
}
