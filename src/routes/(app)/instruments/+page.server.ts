import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listBenches } from '$lib/server/repositories/equipment';
import { BenchTokenError, createBenchToken, listBenchTokens, revokeBenchToken } from '$lib/server/tokens';
import { ingestService } from '$lib/server/ingest/service';
import type { Actions, PageServerLoad } from './$types';

const MANAGERS = ['supervisor', 'admin'] as const;
const createSchema = z.object({ benchId: z.coerce.number().int().positive(), label: z.string().trim().max(80).default('') });
const revokeSchema = z.object({ tokenId: z.coerce.number().int().positive() });

export const load = (async ({ locals }) => {
	requireRole(locals, MANAGERS);
	const { db } = appDatabase();
	const [benches, tokens] = await Promise.all([listBenches(db), listBenchTokens(db)]);
	return { benches: benches.map((b) => ({ id: b.id, name: b.name })), tokens };
}) satisfies PageServerLoad;

export const actions = {
	create: async ({ locals, request }) => {
		const actor = requireRole(locals, MANAGERS);
		const parsed = createSchema.safeParse(Object.fromEntries(await request.formData()));
		if (!parsed.success) return fail(400, { action: 'create', message: 'Choose a bench; the label may have at most 80 characters.' });
		try {
			const made = await createBenchToken(appDatabase().db, actor, parsed.data.benchId, parsed.data.label);
			// The clear token goes to this response only; it is not stored and cannot be shown again.
			return { action: 'create', token: made.token, tokenId: made.id };
		} catch (e) {
			if (e instanceof BenchTokenError) return fail(400, { action: 'create', message: e.message });
			throw e;
		}
	},
	revoke: async ({ locals, request }) => {
		const actor = requireRole(locals, MANAGERS);
		const parsed = revokeSchema.safeParse(Object.fromEntries(await request.formData()));
		if (!parsed.success) return fail(400, { action: 'revoke', message: 'No such token.' });
		try {
			ingestService(); // so that open streams of the token are closed at once (see revokeBenchToken)
			await revokeBenchToken(appDatabase().db, actor, parsed.data.tokenId);
			return { action: 'revoke', done: 'Token revoked: instruments using it are refused from now on.' };
		} catch (e) {
			if (e instanceof BenchTokenError) return fail(400, { action: 'revoke', message: e.message });
			throw e;
		}
	}
} satisfies Actions;
