// The live hub (/ws/v1/live) against the real server: session check at the upgrade, reduced readings
// and detector states, resume from a seq, the overview, and a slow subscriber beside a fast one.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ingestFixture, openOk, openSocket, post, readings, wsUrl, type Fixture } from './ingest-fixture';

let f: Fixture;
let ratio: number;
// Default heartbeats here: a subscriber that stops reading for a few seconds must not be dropped.
beforeAll(async () => {
	f = await ingestFixture();
	ratio = f.ratioFor('Ga', 0);
}, 60_000);
afterAll(async () => {
	await f?.close();
});

describe('live hub /ws/v1/live', () => {
	it('refuses a browser without a session cookie (401)', async () => {
		expect((await openSocket(wsUrl(f.server.baseUrl, '/ws/v1/live'), {})).status).toBe(401);
		expect((await openSocket(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie: 'stillpoint.session_token=forged' })).status).toBe(401);
	});

	it('delivers reduced readings and the detector state to a subscriber, and resumes from a seq with no gap or repeat', async () => {
		const run = await f.recordingRun(0);
		const cookie = await f.cookie();
		const live = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie });
		expect((await live.c.until((m) => m.type === 'hello')).user.role).toBe('admin');
		live.ws.send(JSON.stringify({ type: 'subscribe', runId: String(run.runId) }));
		expect((await live.c.until((m) => m.type === 'run')).run).toMatchObject({ runId: String(run.runId), fixedPoint: 'Ga', reduction: 'calibrated' });
		await live.c.until((m) => m.type === 'synced');
		await post(f.server.baseUrl, run.runId, run.token, { readings: readings(0, 50, f.ratioFor('Ga', 0.5)) });
		const seen = new Set<number>();
		let last: any = null;
		await live.c.until((m) => {
			if (m.type === 'readings' && m.source === 'live') for (const r of m.readings) (seen.add(r.seq), (last = { r, m }));
			return seen.size === 50;
		});
		expect(last.r.t90Kelvin).toBeGreaterThan(302.9);
		expect(Math.abs(last.r.deltaMilliKelvin - 0.5)).toBeLessThan(2); // the ratio was made for +0.5 mK
		expect(last.m.detector).toMatchObject({ state: expect.any(String), readings: expect.any(Number) });
		live.ws.terminate();
		// readings arrive while the browser is away; it comes back asking from seq 50
		await post(f.server.baseUrl, run.runId, run.token, { readings: readings(50, 30, ratio) });
		const again = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie });
		again.ws.send(JSON.stringify({ type: 'subscribe', runId: String(run.runId), fromSeq: 50 }));
		await again.c.until((m) => m.type === 'synced');
		await post(f.server.baseUrl, run.runId, run.token, { readings: readings(80, 20, ratio) });
		const got: number[] = [];
		await again.c.until((m) => {
			if (m.type === 'readings') got.push(...m.readings.map((r: { seq: number }) => r.seq));
			return got.length >= 50;
		});
		await new Promise((r) => setTimeout(r, 200));
		const all = again.c.messages.filter((m) => m.type === 'readings').flatMap((m) => m.readings.map((r: { seq: number }) => r.seq));
		expect(all).toEqual(Array.from({ length: 50 }, (_, i) => 50 + i));
		again.ws.close();
	});

	it('the overview lists recording benches and follows them', async () => {
		const run = await f.recordingRun(1);
		const live = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie: await f.cookie('tomas.varga@kestrelvale.example') });
		live.ws.send(JSON.stringify({ type: 'subscribe-overview' }));
		const first = await live.c.until((m) => m.type === 'overview');
		expect(first.benches.map((b: { runId: string }) => b.runId)).toContain(String(run.runId));
		await post(f.server.baseUrl, run.runId, run.token, { readings: readings(0, 5, ratio) });
		const upd = await live.c.until((m) => m.type === 'overview' && m.benches.some((b: any) => b.runId === String(run.runId) && b.latest?.seq === 4));
		expect(upd.benches.find((b: any) => b.runId === String(run.runId)).latest.t90Kelvin).toBeGreaterThan(302);
		live.ws.close();
	});

	it('a slow subscriber (not reading its socket) does not delay another', async () => {
		const run = await f.recordingRun(2);
		const cookie = await f.cookie();
		const slow = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie });
		const fast = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie });
		for (const s of [slow, fast]) s.ws.send(JSON.stringify({ type: 'subscribe', runId: String(run.runId) }));
		await slow.c.until((m) => m.type === 'synced');
		await fast.c.until((m) => m.type === 'synced');
		// the slow browser stops reading: the server's socket buffer fills, the hub must skip it
		(slow.ws as unknown as { _socket: import('node:net').Socket })._socket.pause();
		const sentAt = new Map<number, number>();
		const latencies: number[] = [];
		fast.ws.on('message', (d) => {
			const m = JSON.parse(d.toString());
			if (m.type === 'readings' && m.source === 'live') for (const r of m.readings) if (sentAt.has(r.seq)) latencies.push(Date.now() - sentAt.get(r.seq)!);
		});
		let seq = 0;
		for (let k = 0; k < 40; k++) {
			const batch = readings(seq, 1000, ratio);
			const t = Date.now();
			for (const r of batch) sentAt.set(r.seq, t);
			seq += 1000;
			const res = await post(f.server.baseUrl, run.runId, run.token, { readings: batch });
			expect(res.status).toBe(200);
		}
		const deadline = Date.now() + 10_000;
		while (latencies.length < seq && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
		expect(latencies.length).toBe(seq); // every reading reached the fast subscriber
		latencies.sort((a, b) => a - b);
		expect(latencies[Math.floor(latencies.length * 0.95)]).toBeLessThan(1500);
		// the slow one, once it reads again, gets decimated updates ending at the newest reading
		(slow.ws as unknown as { _socket: import('node:net').Socket })._socket.resume();
		await slow.c.until((m) => m.type === 'readings' && m.readings.some((r: { seq: number }) => r.seq === seq - 1), 15_000);
		const slowLive = slow.c.messages.filter((m) => m.type === 'readings' && m.source === 'live');
		const delivered = slowLive.reduce((n, m) => n + m.readings.length, 0);
		expect(slowLive.reduce((n, m) => n + m.skipped, 0) + delivered).toBe(seq);
		expect(delivered).toBeLessThan(seq);
		slow.ws.terminate();
		fast.ws.close();
	});
});
