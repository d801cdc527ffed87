// The WebSocket half of the instrument protocol and the live hub, against the real server.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { revokeBenchToken } from '../../src/lib/server/tokens/index';
import { ingestFixture, openOk, openSocket, post, readings, wsUrl, type Fixture } from './ingest-fixture';

let f: Fixture;
let ratio: number;
// Short heartbeats so that the missed-pong and revocation checks run within a test.
beforeAll(async () => {
	f = await ingestFixture({ STILLPOINT_WS_PING_MS: '200', STILLPOINT_WS_PONG_TIMEOUT_MS: '700' });
	ratio = f.ratioFor('Ga', 0);
}, 60_000);
afterAll(async () => {
	await f?.close();
});

const ingestUrl = (runId: number) => wsUrl(f.server.baseUrl, `/ws/v1/ingest?runId=${runId}`);
const bearer = (token: string) => ({ authorization: `Bearer ${token}` });
const closed = (ws: import('ws').WebSocket) => new Promise<{ code: number; reason: string }>((r) => ws.once('close', (code, reason) => r({ code, reason: reason.toString() })));

describe('WebSocket ingest /ws/v1/ingest', () => {
	it('refuses the upgrade with 401 / 403 / 404 before any frame', async () => {
		const run = await f.recordingRun(0);
		const other = await f.recordingRun(1);
		expect((await openSocket(ingestUrl(run.runId), {})).status).toBe(401);
		expect((await openSocket(ingestUrl(run.runId), bearer('spb_' + 'C'.repeat(43)))).status).toBe(401);
		const cross = await openSocket(ingestUrl(other.runId), bearer(run.token));
		expect(cross.status).toBe(403);
		if (cross.ws === null) expect(JSON.parse(cross.body).error.code).toBe('forbidden');
		expect((await openSocket(ingestUrl(999_999), bearer(run.token))).status).toBe(404);
		await transitionRun(f.db, f.admin, other.runId, 'finish');
		const notRecording = await openSocket(ingestUrl(other.runId), bearer(other.token));
		expect(notRecording.status).toBe(403);
		if (notRecording.ws === null) expect(JSON.parse(notRecording.body).error.code).toBe('run_not_recording');
	});

	it('says hello, acks after commits, rejects a bad reading without stopping the stream, and resumes with no gap and no duplicate', async () => {
		const run = await f.recordingRun(2);
		const a = await openOk(ingestUrl(run.runId), bearer(run.token));
		expect(await a.c.until((m) => m.type === 'hello')).toEqual({ type: 'hello', runId: String(run.runId), highestDurableSeq: -1 });
		const all = readings(0, 600, ratio);
		a.ws.send(JSON.stringify({ type: 'readings', readings: all.slice(0, 200) }));
		a.ws.send(JSON.stringify({ type: 'reading', ...all[200], ratio: -1 }));
		for (const r of all.slice(201, 300)) a.ws.send(JSON.stringify({ type: 'reading', ...r }));
		const rejected = await a.c.until((m) => m.type === 'rejected');
		expect(rejected).toMatchObject({ seq: 200, errors: [{ field: 'ratio', value: -1 }] });
		await a.c.until((m) => m.type === 'ack' && m.highestDurableSeq === 299);
		// the connection drops without a goodbye (the client does not know what the last frames did)
		a.ws.terminate();
		const b = await openOk(ingestUrl(run.runId), bearer(run.token));
		const hello = await b.c.until((m) => m.type === 'hello');
		expect(hello.highestDurableSeq).toBe(299);
		// resend from an overlap (as a careless client might) and the missing one
		b.ws.send(JSON.stringify({ type: 'readings', readings: [all[200], ...all.slice(250, 600)] }));
		await b.c.until((m) => m.type === 'ack' && m.highestDurableSeq === 599);
		b.ws.close();
		const rows = await f.db.selectFrom('reading').select('seq').where('run_id', '=', run.runId).orderBy('seq').execute();
		expect(rows.map((r) => r.seq)).toEqual(all.map((r) => r.seq));
		const runRow = await f.db.selectFrom('run').select(['reading_count', 'highest_seq']).where('id', '=', run.runId).executeTakeFirstOrThrow();
		expect(runRow).toEqual({ reading_count: 600, highest_seq: 599 });
	});

	it('closes a frame past 256 KiB with 1009, and a stream whose run stops recording with 4403', async () => {
		const run = await f.recordingRun(3);
		const a = await openOk(ingestUrl(run.runId), bearer(run.token));
		await a.c.until((m) => m.type === 'hello');
		const tooBig = closed(a.ws);
		a.ws.send(JSON.stringify({ type: 'readings', readings: readings(0, 3000, ratio) }));
		expect((await tooBig).code).toBe(1009);
		const b = await openOk(ingestUrl(run.runId), bearer(run.token));
		await b.c.until((m) => m.type === 'hello');
		const bye = closed(b.ws);
		await transitionRun(f.db, f.admin, run.runId, 'finish');
		b.ws.send(JSON.stringify({ type: 'reading', ...readings(0, 1, ratio)[0] }));
		expect((await bye).code).toBe(4403);
		expect(b.c.messages.some((m) => m.type === 'error' && m.code === 'run_not_recording')).toBe(true);
	});

	it('drops a client that stops answering pings (4408) and a stream whose token is revoked (4401)', async () => {
		const run = await f.recordingRun(4);
		const silent = await openOk(ingestUrl(run.runId), bearer(run.token), { autoPong: false });
		const gone = closed(silent.ws);
		const live = await openOk(ingestUrl(run.runId), bearer(run.token));
		const revoked = closed(live.ws);
		const t0 = Date.now();
		expect((await gone).code).toBe(4408);
		expect(Date.now() - t0).toBeLessThan(5000);
		await revokeBenchToken(f.db, f.admin, run.tokenId);
		expect((await revoked).code).toBe(4401);
	});
});

