import { z } from 'zod';
import { APIError } from 'better-auth/api';
import { RateLimiter } from '../rate-limit';
import type { Auth } from './better-auth';

export const signInSchema = z.object({
	email: z.string().trim().toLowerCase().email('Enter the e-mail address your account was made with.'),
	password: z.string().min(1, 'Enter your password.').max(200, 'That password is longer than any we issue.')
});

// Failed attempts: 5 per account per 5 minutes, 30 per client address per 5 minutes.
const perAccount = new RateLimiter(5, 5 / 300);
const perClient = new RateLimiter(30, 30 / 300);

export type SignInOutcome =
	| { ok: true }
	| { ok: false; status: 400 | 429; message: string; field?: 'email' | 'password' };

export async function signIn(auth: Auth, input: { email: string; password: string }, clientAddress: string, headers: Headers): Promise<SignInOutcome> {
	const accountKey = `account:${input.email}`;
	const clientKey = `client:${clientAddress}`;
	for (const [limiter, key] of [[perAccount, accountKey], [perClient, clientKey]] as const) {
		const taken = limiter.take(key);
		if (!taken.allowed) {
			return { ok: false, status: 429, message: `Too many sign-in attempts. Try again in ${taken.retryAfterS} s.` };
		}
	}
	try {
		await auth.api.signInEmail({ body: { email: input.email, password: input.password }, headers });
	} catch (e) {
		if (e instanceof APIError) {
			// One message for a wrong address and a wrong password, so the form does not reveal which accounts exist.
			const banned = String(e.body?.code ?? '').includes('BANNED');
			return {
				ok: false,
				status: 400,
				message: banned ? 'This account is disabled. Ask an admin to enable it.' : 'That e-mail and password do not match an account.'
			};
		}
		throw e;
	}
	perAccount.refund(accountKey);
	perClient.refund(clientKey);
	return { ok: true };
}
