import { createHash, randomBytes } from 'node:crypto';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from '../repositories/audit';

/**
 * Bench tokens: the credential an instrument script holds for one bench. `spb_` + 43 base64url
 * characters (32 random bytes). Shown once when made; only its SHA-256 is stored.
 *
 * Why a plain SHA-256 rather than a slow password hash: the token carries 256 bits from the CSPRNG,
 * so a stolen hash cannot be brute-forced whatever the speed of the hash; key stretching only helps
 * low-entropy secrets such as passwords. A fast hash also lets every request be checked with one
 * indexed lookup (token_hash is unique), with no per-request CPU cost worth mentioning.
 */
export const BENCH_TOKEN_PREFIX = 'spb_';
export const BENCH_TOKEN_PATTERN = /^spb_[A-Za-z0-9_-]{43}$/;

export function hashBenchToken(token: string): string {
	return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function tokenHint(token: string): string {
	return `${BENCH_TOKEN_PREFIX}…${token.slice(-4)}`;
}

export class BenchTokenError extends Error {
	constructor(
		readonly code: 'not_found' | 'invalid_input' | 'already_revoked',
		message: string
	) {
		super(message);
	}
}

/** Makes a token for a bench; the clear token is returned once and never stored. */
export async function createBenchToken(db: DB, actor: SessionUser, benchId: number, label: string): Promise<{ id: number; token: string }> {
	const cleanLabel = label.trim().slice(0, 80);
	const bench = await db.selectFrom('bench').select(['id', 'name', 'retired_at']).where('id', '=', benchId).executeTakeFirst();
	if (!bench) throw new BenchTokenError('not_found', `Bench #${benchId} does not exist.`);
	if (bench.retired_at !== null) throw new BenchTokenError('invalid_input', `Bench “${bench.name}” is retired.`);
	const token = BENCH_TOKEN_PREFIX + randomBytes(32).toString('base64url');
	const nowMs = Date.now();
	const row = await db
		.insertInto('bench_token')
		.values({ bench_id: benchId, label: cleanLabel, token_hash: hashBenchToken(token), token_hint: tokenHint(token), created_by: actor.id, created_at: nowMs })
		.returning('id')
		.executeTakeFirstOrThrow();
	await recordAudit(db, {
		actor,
		action: 'bench_token.create',
		objectType: 'bench_token',
		objectId: row.id,
		summary: `Made bench token ${tokenHint(token)} for “${bench.name}”${cleanLabel ? ` (${cleanLabel})` : ''}`,
		details: { benchId, label: cleanLabel },
		atMs: nowMs
	});
	return { id: row.id, token };
}

/** Revokes a token at once; the ingest refuses it from then on (HTTP 403, WebSocket closed 4401). */
export async function revokeBenchToken(db: DB, actor: SessionUser, tokenId: number): Promise<void> {
	const row = await db.selectFrom('bench_token').innerJoin('bench', 'bench.id', 'bench_token.bench_id').select(['bench_token.id', 'bench_token.token_hint', 'bench_token.revoked_at', 'bench.name']).where('bench_token.id', '=', tokenId).executeTakeFirst();
	if (!row) throw new BenchTokenError('not_found', `Bench token #${tokenId} does not exist.`);
	if (row.revoked_at !== null) throw new BenchTokenError('already_revoked', `Token ${row.token_hint} is already revoked.`);
	const nowMs = Date.now();
	await db.updateTable('bench_token').set({ revoked_at: nowMs }).where('id', '=', tokenId).where('revoked_at', 'is', null).execute();
	await recordAudit(db, { actor, action: 'bench_token.revoke', objectType: 'bench_token', objectId: tokenId, summary: `Revoked bench token ${row.token_hint} of “${row.name}”`, atMs: nowMs });
	// Tell this process's ingest to drop open streams of the token (other processes see it on their next check).
	const onRevoked = (globalThis as Record<symbol, unknown>)[Symbol.for('stillpoint.tokenRevoked')];
	if (typeof onRevoked === 'function') onRevoked(tokenId);
}

export interface BenchTokenListEntry {
	id: number;
	benchId: number;
	benchName: string;
	label: string;
	hint: string;
	createdAtMs: number;
	createdBy: string | null;
	lastUsedAtMs: number | null;
	revokedAtMs: number | null;
}

export async function listBenchTokens(db: DB): Promise<BenchTokenListEntry[]> {
	const rows = await db
		.selectFrom('bench_token')
		.innerJoin('bench', 'bench.id', 'bench_token.bench_id')
		.leftJoin('user', 'user.id', 'bench_token.created_by')
		.select(['bench_token.id', 'bench_token.bench_id', 'bench.name as bench_name', 'bench_token.label', 'bench_token.token_hint', 'bench_token.created_at', 'user.name as creator', 'bench_token.last_used_at', 'bench_token.revoked_at'])
		.orderBy('bench_token.revoked_at', (ob) => ob.nullsFirst())
		.orderBy('bench_token.created_at', 'desc')
		.execute();
	return rows.map((r) => ({
		id: r.id,
		benchId: r.bench_id,
		benchName: r.bench_name,
		label: r.label,
		hint: r.token_hint,
		createdAtMs: r.created_at,
		createdBy: r.creator,
		lastUsedAtMs: r.last_used_at,
		revokedAtMs: r.revoked_at
	}));
}
