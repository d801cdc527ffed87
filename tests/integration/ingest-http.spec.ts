// The HTTP half of the instrument protocol against the real server (docs/ingest-protocol.md).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { revokeBenchToken } from '../../src/lib/server/tokens/index';
import { transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { ingestFixture, post, readings, type Fixture } from './ingest-fixture';

let f: Fixture;
let run: Awaited<ReturnType<Fixture['recordingRun']>>;
let ratio: number;
beforeAll(async () => {
	f = await ingestFixture();
	run = await f.recordingRun(0);
	ratio = f.ratioFor('Ga', 0);
}, 60_000);
afterAll(async () => {
	await f?.close();
});

const get = (token: string | null) => fetch(`${f.server.baseUrl}/api/v1/bench/run`, { headers: token ? { authorization: `Bearer ${token}` } : {} });

describe('GET /api/v1/bench/run', () => {
	it('names the bench’s recording run and its highest durable seq', async () => {
		const res = await get(run.token);
		expect(res.status).toBe(200);
		expect(await res.json()).toEqual({ benchId: String(run.benchId), runId: String(run.runId), state: 'recording', highestDurableSeq: -1 });
	});
	it('404 no_active_run when the bench has none; 401 without or with a wrong token', async () => {
		const other = await f.token(4);
		const none = await get(other.token);
		expect(none.status).toBe(404);
		expect((await none.json()).error.code).toBe('no_active_run');
		expect((await get(null)).status).toBe(401);
		const wrong = await get('spb_' + 'A'.repeat(43));
		expect(wrong.status).toBe(401);
		expect((await wrong.json()).error.code).toBe('invalid_token');
		expect((await get('not-a-token')).status).toBe(401);
	});
});

describe('POST /api/v1/runs/{runId}/readings', () => {
	it('stores a JSON batch and an NDJSON batch, answering with accepted / duplicates / highestDurableSeq', async () => {
		const a = await post(f.server.baseUrl, run.runId, run.token, { readings: readings(0, 100, ratio) });
		expect(a.status).toBe(200);
		expect(a.body).toEqual({ accepted: 100, duplicates: 0, highestDurableSeq: 99, timeBackwards: 0 });
		const nd = readings(100, 20, ratio).map((r) => JSON.stringify(r)).join('\n');
		const b = await post(f.server.baseUrl, run.runId, run.token, nd, 'application/x-ndjson');
		expect(b.body).toEqual({ accepted: 20, duplicates: 0, highestDurableSeq: 119, timeBackwards: 0 });
		expect(await f.readingCount(run.runId)).toBe(120);
		const stored = await f.db.selectFrom('reading').selectAll().where('run_id', '=', run.runId).where('seq', '=', 7).executeTakeFirstOrThrow();
		expect(stored.ratio).toBe(readings(0, 100, ratio)[7].ratio); // exactly as sent
		const row = await f.db.selectFrom('run').select(['reading_count', 'highest_seq', 'last_reading_at']).where('id', '=', run.runId).executeTakeFirstOrThrow();
		expect(row).toMatchObject({ reading_count: 120, highest_seq: 119 });
		expect(row.last_reading_at).toBeGreaterThan(Date.now() - 60_000);
		const token = await f.db.selectFrom('bench_token').select('last_used_at').where('id', '=', run.tokenId).executeTakeFirstOrThrow();
		expect(token.last_used_at).toBeGreaterThan(Date.now() - 60_000);
	});

	it('counts duplicates (a resent batch, a seq repeated within a batch) and stores nothing twice', async () => {
		const again = await post(f.server.baseUrl, run.runId, run.token, { readings: readings(110, 20, ratio) });
		expect(again.body).toEqual({ accepted: 10, duplicates: 10, highestDurableSeq: 129, timeBackwards: 0 });
		const [x] = readings(130, 1, ratio);
		const twice = await post(f.server.baseUrl, run.runId, run.token, { readings: [x, { ...x }, { ...x, ratio: x.ratio * 2 }] });
		expect(twice.body).toMatchObject({ accepted: 1, duplicates: 2, highestDurableSeq: 130 });
		expect(await f.readingCount(run.runId)).toBe(131);
		const stored = await f.db.selectFrom('reading').select('ratio').where('run_id', '=', run.runId).where('seq', '=', 130).executeTakeFirstOrThrow();
		expect(stored.ratio).toBe(x.ratio); // the first copy wins
	});

	it('stores a reading whose time goes backwards, counts it in timeBackwards (rule in the protocol)', async () => {
		const batch = readings(131, 3, ratio);
		batch[1].timeMs = batch[0].timeMs - 5000; // a clock step back
		const res = await post(f.server.baseUrl, run.runId, run.token, { readings: batch });
		expect(res.body).toEqual({ accepted: 3, duplicates: 0, highestDurableSeq: 133, timeBackwards: 1 });
		const rows = await f.db.selectFrom('reading').select(['seq', 'time_ms']).where('run_id', '=', run.runId).where('seq', '>=', 131).orderBy('seq').execute();
		expect(rows.map((r) => r.time_ms)).toEqual(batch.map((r) => r.timeMs));
		// equal times are not backwards
		const same = readings(134, 2, ratio);
		same[1].timeMs = same[0].timeMs;
		expect((await post(f.server.baseUrl, run.runId, run.token, { readings: same })).body.timeBackwards).toBe(0);
	});

	const bad: [string, Record<string, unknown>, string][] = [
		['seq negative', { seq: -1 }, 'seq'],
		['seq fractional', { seq: 1.5 }, 'seq'],
		['seq a string', { seq: '9' }, 'seq'],
		['timeMs fractional', { timeMs: 1.5 }, 'timeMs'],
		['timeMs missing', { timeMs: undefined }, 'timeMs'],
		['ratio zero', { ratio: 0 }, 'ratio'],
		['ratio negative', { ratio: -1.14 }, 'ratio'],
		['ratio null (NaN in JSON)', { ratio: null }, 'ratio'],
		['currentMilliAmp zero', { currentMilliAmp: 0 }, 'currentMilliAmp'],
		['currentMilliAmp above 50', { currentMilliAmp: 51 }, 'currentMilliAmp'],
		['channel 64', { channel: 64 }, 'channel'],
		['an unknown field', { temperature: 302 }, 'temperature']
	];
	for (const [what, patch, field] of bad) {
		it(`refuses the whole batch with 422 for ${what}, storing nothing`, async () => {
			const before = await f.readingCount(run.runId);
			const batch: Record<string, unknown>[] = readings(5000, 3, ratio).map((r) => ({ ...r }));
			Object.assign(batch[1], patch);
			const res = await post(f.server.baseUrl, run.runId, run.token, { readings: batch });
			expect(res.status).toBe(422);
			expect(res.body.error.code).toBe('invalid_readings');
			expect(res.body.error.details).toEqual([expect.objectContaining({ index: 1, field, reason: expect.any(String) })]);
			expect(res.body.error.details[0].seq).toBe(typeof batch[1].seq === 'number' && Number.isInteger(batch[1].seq) && (batch[1].seq as number) >= 0 ? batch[1].seq : null);
			expect(await f.readingCount(run.runId)).toBe(before);
		});
	}

	it('400 for a body that is not JSON / NDJSON at all, 415 for another content type', async () => {
		const before = await f.readingCount(run.runId);
		expect((await post(f.server.baseUrl, run.runId, run.token, '{"readings": [')).status).toBe(400);
		expect((await post(f.server.baseUrl, run.runId, run.token, '[]')).body.error.code).toBe('invalid_body');
		expect((await post(f.server.baseUrl, run.runId, run.token, `${JSON.stringify(readings(9000, 1, ratio)[0])}\n{oops`, 'application/x-ndjson')).body.error).toMatchObject({ code: 'invalid_ndjson', details: { line: 2 } });
		expect((await post(f.server.baseUrl, run.runId, run.token, '{}', 'application/xml')).status).toBe(415);
		expect(await f.readingCount(run.runId)).toBe(before);
	});

	it('413 past 1 MiB or 5 000 readings, in the API error shape', async () => {
		const big = await post(f.server.baseUrl, run.runId, run.token, JSON.stringify({ readings: readings(10_000, 4000, ratio), pad: 'x'.repeat(1024 * 1024) }));
		expect(big.status).toBe(413);
		expect(big.body.error.code).toBe('payload_too_large');
		const many = await post(f.server.baseUrl, run.runId, run.token, { readings: readings(10_000, 5001, ratio) });
		expect(many.status).toBe(413);
		expect(many.body.error.code).toBe('too_many_readings');
		// 5 000 readings fit (about 480 KB): adapter-node's own limit is not in the way
		const most = await post(f.server.baseUrl, run.runId, run.token, { readings: readings(10_000, 5000, ratio) });
		expect(most.status).toBe(200);
		expect(most.body.accepted).toBe(5000);
	});

	it('401 without or with an unknown token, 403 for a revoked token', async () => {
		expect((await post(f.server.baseUrl, run.runId, null, { readings: [] })).status).toBe(401);
		expect((await post(f.server.baseUrl, run.runId, 'spb_' + 'B'.repeat(43), { readings: [] })).body.error.code).toBe('invalid_token');
		const t = await f.token(0);
		expect((await post(f.server.baseUrl, run.runId, t.token, { readings: [] })).status).toBe(200);
		await revokeBenchToken(f.db, f.admin, t.tokenId);
		const revoked = await post(f.server.baseUrl, run.runId, t.token, { readings: readings(20_000, 1, ratio) });
		expect(revoked.status).toBe(403);
		expect(revoked.body.error.code).toBe('forbidden');
	});

	it('403 for another bench’s run and for a run that is not recording; 404 for no such run', async () => {
		const other = await f.recordingRun(1);
		const cross = await post(f.server.baseUrl, other.runId, run.token, { readings: readings(0, 1, ratio) });
		expect(cross.status).toBe(403);
		expect(cross.body.error.code).toBe('forbidden');
		expect(await f.readingCount(other.runId)).toBe(0);
		await transitionRun(f.db, f.admin, other.runId, 'finish');
		const finished = await post(f.server.baseUrl, other.runId, other.token, { readings: readings(0, 1, ratio) });
		expect(finished.status).toBe(403);
		expect(finished.body.error.code).toBe('run_not_recording');
		expect((await post(f.server.baseUrl, 999_999, run.token, { readings: [] })).status).toBe(404);
		expect((await post(f.server.baseUrl, 'abc', run.token, { readings: [] })).status).toBe(404);
	});

	it('429 with Retry-After past the per-token rate (20/s, burst 40)', async () => {
		const t = await f.token(0);
		const results = await Promise.all(Array.from({ length: 70 }, () => post(f.server.baseUrl, run.runId, t.token, { readings: [] })));
		const limited = results.filter((r) => r.status === 429);
		expect(limited.length).toBeGreaterThan(0);
		expect(results.filter((r) => r.status === 200).length).toBeGreaterThanOrEqual(40);
		expect(Number(limited[0].headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
		expect(limited[0].body.error.code).toBe('rate_limited');
		// another token is not affected
		expect((await post(f.server.baseUrl, run.runId, run.token, { readings: [] })).status).toBe(200);
	});

	it('serves the OpenAPI document publicly', async () => {
		const res = await fetch(`${f.server.baseUrl}/api/v1/openapi.json`);
		expect(res.status).toBe(200);
		const doc = await res.json();
		expect(doc.openapi).toMatch(/^3\.1/);
		expect(Object.keys(doc.paths)).toEqual(expect.arrayContaining(['/api/v1/bench/run', '/api/v1/runs/{runId}/readings']));
	});
});
