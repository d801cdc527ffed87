// Bench-token checks shared by the HTTP endpoints and the WebSocket upgrade. Synchronous, on the app's
// better-sqlite3 handle with prepared statements: one indexed lookup per request or upgrade, always
// fresh, so a revocation takes effect on the next request.

import type SQLite from 'better-sqlite3';
import { BENCH_TOKEN_PATTERN, hashBenchToken } from '../tokens';

export type Refusal = { ok: false; status: 401 | 403 | 404; code: string; message: string };
export interface TokenIdentity {
	tokenId: number;
	benchId: number;
}
export interface RunTarget {
	id: number;
	benchId: number;
	state: string;
	highestSeq: number;
}

interface Statements {
	token: SQLite.Statement<[string], { id: number; bench_id: number; revoked_at: number | null; retired_at: number | null }>;
	run: SQLite.Statement<[number], { id: number; bench_id: number; state: string; highest_seq: number }>;
	recording: SQLite.Statement<[number], { id: number; bench_id: number; state: string; highest_seq: number }>;
	tokenAlive: SQLite.Statement<[number], { revoked_at: number | null }>;
}
const prepared = new WeakMap<SQLite.Database, Statements>();

function statements(sqlite: SQLite.Database): Statements {
	let s = prepared.get(sqlite);
	if (!s) {
		s = {
			token: sqlite.prepare('select t.id, t.bench_id, t.revoked_at, b.retired_at from bench_token t join bench b on b.id = t.bench_id where t.token_hash = ?'),
			run: sqlite.prepare('select id, bench_id, state, highest_seq from run where id = ?'),
			recording: sqlite.prepare("select id, bench_id, state, highest_seq from run where bench_id = ? and state = 'recording'"),
			tokenAlive: sqlite.prepare('select revoked_at from bench_token where id = ?')
		};
		prepared.set(sqlite, s);
	}
	return s;
}

/** The token from `Authorization: Bearer <token>`, or null. */
export function bearerToken(header: string | null | undefined): string | null {
	if (!header) return null;
	const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
	return m ? m[1] : null;
}

export function authenticateToken(sqlite: SQLite.Database, token: string | null): { ok: true; identity: TokenIdentity } | Refusal {
	if (!token) return { ok: false, status: 401, code: 'invalid_token', message: 'Send the bench token as "Authorization: Bearer spb_…".' };
	// The shape is checked first so that arbitrary strings never reach the database.
	if (!BENCH_TOKEN_PATTERN.test(token)) return { ok: false, status: 401, code: 'invalid_token', message: 'That is not a bench token (expected spb_ and 43 base64url characters).' };
	const row = statements(sqlite).token.get(hashBenchToken(token));
	if (!row) return { ok: false, status: 401, code: 'invalid_token', message: 'Unknown bench token.' };
	if (row.revoked_at !== null) return { ok: false, status: 403, code: 'forbidden', message: 'This bench token has been revoked.' };
	if (row.retired_at !== null) return { ok: false, status: 403, code: 'forbidden', message: 'The bench of this token is retired.' };
	return { ok: true, identity: { tokenId: row.id, benchId: row.bench_id } };
}

export function tokenStillValid(sqlite: SQLite.Database, tokenId: number): boolean {
	const row = statements(sqlite).tokenAlive.get(tokenId);
	return !!row && row.revoked_at === null;
}

/** May this token post to this run now? */
export function authorizeRun(sqlite: SQLite.Database, identity: TokenIdentity, runId: number): { ok: true; run: RunTarget } | Refusal {
	const row = Number.isSafeInteger(runId) ? statements(sqlite).run.get(runId) : undefined;
	if (!row) return { ok: false, status: 404, code: 'not_found', message: `Run ${runId} does not exist.` };
	if (row.bench_id !== identity.benchId) return { ok: false, status: 403, code: 'forbidden', message: `Run ${runId} belongs to another bench; this token may post only to its own bench's run.` };
	if (row.state !== 'recording') return { ok: false, status: 403, code: 'run_not_recording', message: `Run ${runId} is ${row.state}, not recording.` };
	return { ok: true, run: { id: row.id, benchId: row.bench_id, state: row.state, highestSeq: row.highest_seq } };
}

export function recordingRunOfBench(sqlite: SQLite.Database, benchId: number): RunTarget | null {
	const row = statements(sqlite).recording.get(benchId);
	return row ? { id: row.id, benchId: row.bench_id, state: row.state, highestSeq: row.highest_seq } : null;
}
