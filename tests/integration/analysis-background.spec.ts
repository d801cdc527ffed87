// A run's final analysis is computed off the main thread as soon as the run stops recording
// (src/lib/server/analysis/background.ts): the cache is filled without anybody asking for it, and the
// run page's request then gets that very result.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { ingestFixture, post, readings, type Fixture } from './ingest-fixture';

let f: Fixture;
beforeAll(async () => {
	f = await ingestFixture();
}, 60_000);
afterAll(async () => {
	await f?.close();
});

const cached = async (runId: number) => (await f.db.selectFrom('run').select('analysis_json').where('id', '=', runId).executeTakeFirstOrThrow()).analysis_json;

describe('final analysis in the background', () => {
	it('is cached after the run finishes, before any request, and served from that cache', async () => {
		const run = await f.recordingRun(0);
		const ratio = f.ratioFor('Ga', 0);
		for (let from = 0; from < 3000; from += 1000) {
			expect((await post(f.server.baseUrl, run.runId, run.token, { readings: readings(from, 1000, ratio) })).status).toBe(200);
		}
		expect(await cached(run.runId)).toBeNull();
		await transitionRun(f.db, f.admin, run.runId, 'finish');
		const deadline = Date.now() + 30_000;
		while ((await cached(run.runId)) === null && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
		const stored = JSON.parse((await cached(run.runId))!) as { readingCount: number; computedAtMs: number; key: string };
		expect(stored.readingCount).toBe(3000);
		const res = await fetch(`${f.server.baseUrl}/runs/${run.runId}/analysis`, { headers: { cookie: await f.cookie() } });
		expect(res.status).toBe(200);
		const served = (await res.json()) as { computedAtMs: number; key: string };
		expect(served).toMatchObject({ computedAtMs: stored.computedAtMs, key: stored.key });
	}, 60_000);
});
