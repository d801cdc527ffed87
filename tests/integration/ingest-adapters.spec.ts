// The readings endpoint has two adapters around one answer (src/lib/server/ingest/http.ts): the built
// server answers straight from node:http (ingest/direct.ts), the SvelteKit route serves the dev server.
// The same requests against a server of each kind must get the same answers, byte for byte. The
// second server also keeps its writer in-process (STILLPOINT_WRITER=inline) where the first runs it on
// its own thread, so the comparison covers both writers too.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ingestFixture, post, readings, type Fixture } from './ingest-fixture';

let direct: Fixture;
let routed: Fixture;
beforeAll(async () => {
	[direct, routed] = await Promise.all([ingestFixture(), ingestFixture({ STILLPOINT_DIRECT_INGEST: 'off', STILLPOINT_WRITER: 'inline' })]);
}, 90_000);
afterAll(async () => {
	await Promise.all([direct?.close(), routed?.close()]);
});

/** The requests of a session with mistakes in it; every answer is recorded. */
async function session(f: Fixture) {
	const run = await f.recordingRun(0);
	const ratio = f.ratioFor('Ga', 0);
	const url = f.server.baseUrl;
	const answers: { status: number; body: unknown; type: string | null }[] = [];
	const keep = (a: { status: number; body: unknown; headers: Headers }) => answers.push({ status: a.status, body: a.body, type: a.headers.get('content-type') });
	keep(await post(url, run.runId, run.token, { readings: readings(0, 50, ratio) }));
	keep(await post(url, run.runId, run.token, { readings: readings(40, 20, ratio) })); // 10 duplicates
	keep(await post(url, run.runId, run.token, readings(60, 5, ratio).map((r) => JSON.stringify(r)).join('\n'), 'application/x-ndjson'));
	keep(await post(url, run.runId, run.token, { readings: [{ ...readings(65, 1, ratio)[0], ratio: -1 }, { seq: 'x' }] })); // 422
	keep(await post(url, run.runId, run.token, '{"readings": [', 'application/json')); // 400
	// 415. (Not text/plain: SvelteKit's CSRF check answers a form-like type without Origin with its own
	// 403 before the route runs; only the dev server meets that. The built server answers 415, below.)
	keep(await post(url, run.runId, run.token, '<readings/>', 'application/xml'));
	keep(await post(url, run.runId, run.token, 'x'.repeat(1024 * 1024 + 10), 'application/json')); // 413
	keep(await post(url, run.runId, 'spb_' + 'A'.repeat(43), { readings: [] })); // 401
	keep(await post(url, 999_999, run.token, { readings: [] })); // 404
	return { answers, stored: await f.readingCount(run.runId) };
}

describe('readings endpoint: node:http adapter and SvelteKit route', () => {
	it('give the same status, body and content type for the same requests, and store the same', async () => {
		const [a, b] = await Promise.all([session(direct), session(routed)]);
		expect(a.answers.map((x) => x.status)).toEqual([200, 200, 200, 422, 400, 415, 413, 401, 404]);
		expect(b.answers).toEqual(a.answers);
		expect(a.answers[0].type).toMatch(/^application\/json/);
		expect(a.stored).toBe(65);
		expect(b.stored).toBe(65);
		const modes = async (f: Fixture) => ((await (await fetch(`${f.server.baseUrl}/api/v1/health`)).json()) as { ingest: unknown }).ingest;
		expect(await modes(direct)).toEqual({ writer: 'thread', reducer: 'worker' });
		expect(await modes(routed)).toEqual({ writer: 'inline', reducer: 'worker' });
	});

	it('answers a form-like content type with the API\'s 415 in the built server', async () => {
		const run = await direct.recordingRun(1);
		const a = await post(direct.server.baseUrl, run.runId, run.token, 'seq=1', 'text/plain');
		expect(a).toMatchObject({ status: 415, body: { error: { code: 'unsupported_media_type' } } });
	});
});
