import type { Auth } from './better-auth';
import type { Role } from './types';

/**
 * Makes an account directly through better-auth's internal adapter (hashing the password its own way).
 * For the demo seed and tests only: in the app, accounts are made by an admin through the admin API.
 */
export async function provisionUser(auth: Auth, input: { email: string; name: string; password: string; role: Role }): Promise<string> {
	const ctx = await auth.$context;
	const hash = await ctx.password.hash(input.password);
	const user = await ctx.internalAdapter.createUser({ email: input.email, name: input.name, emailVerified: true, role: input.role }, { method: 'admin' });
	await ctx.internalAdapter.linkAccount({ accountId: user.id, providerId: 'credential', password: hash, userId: user.id });
	return user.id;
}
