import { betterAuth } from 'better-auth';
import { admin } from 'better-auth/plugins';
import { sveltekitCookies } from 'better-auth/svelte-kit';
import type { RequestEvent } from '@sveltejs/kit';
import type { Kysely } from 'kysely';
import { accessControl, authRoles } from './roles';

export interface AuthConfig {
	db: Kysely<any>;
	secret: string;
	baseURL?: string;
	/** SvelteKit's getRequestEvent, so that sign-in from a form action sets the cookies. Absent in scripts. */
	getRequestEvent?: () => RequestEvent;
}

/** better-auth on our own SQLite through its Kysely adapter: e-mail + password, roles from the admin plugin. */
export function createAuth({ db, secret, baseURL, getRequestEvent }: AuthConfig) {
	return betterAuth({
		appName: 'Stillpoint',
		baseURL,
		secret,
		database: { db, type: 'sqlite' },
		telemetry: { enabled: false },
		emailAndPassword: {
			enabled: true,
			minPasswordLength: 10,
			// Accounts are made by an admin, never by self sign-up.
			disableSignUp: true
		},
		session: {
			expiresIn: 60 * 60 * 12, // one working day at the bench
			updateAge: 60 * 60
		},
		rateLimit: {
			enabled: true,
			storage: 'database',
			window: 60,
			max: 120,
			customRules: {
				'/sign-in/email': { window: 300, max: 10 }
			}
		},
		advanced: {
			cookiePrefix: 'stillpoint',
			defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' }
		},
		plugins: [
			admin({ ac: accessControl, roles: authRoles, defaultRole: 'technician', adminRoles: ['admin'] }),
			...(getRequestEvent ? [sveltekitCookies(getRequestEvent)] : [])
		]
	});
}

export type Auth = ReturnType<typeof createAuth>;
