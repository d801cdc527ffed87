// See https://svelte.dev/docs/kit/types#app.d.ts
import type { SessionUser } from '$lib/server/auth/types';

declare global {
	namespace App {
		interface Error {
			message: string;
			code?: string;
		}
		interface Locals {
			user: SessionUser | null;
			sessionId: string | null;
			/** Set by `handle` when the user's role may not open this page; the root layout turns it into a 403. */
			forbidden?: string;
		}
	}
}

export {};
