// kill -9 of the server in the middle of a stream: every acknowledged reading is there after the
// restart, none twice, and the clients resume where the server says.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { ingestFixture, openOk, openSocket, readings, wsUrl, type Fixture } from './ingest-fixture';

let f: Fixture;
beforeAll(async () => {
	f = await ingestFixture({ STILLPOINT_INGEST_RATE_PER_S: '1000', STILLPOINT_INGEST_RATE_BURST: '1000' });
}, 60_000);
afterAll(async () => {
	await f?.close();
});

it('loses nothing acknowledged over HTTP or WebSocket when the server is killed with SIGKILL', async () => {
	const ratio = f.ratioFor('Ga', 0);
	const wsRun = await f.recordingRun(0);
	const httpRun = await f.recordingRun(1);
	const all = readings(0, 200_000, ratio);
	let wsAcked = -1;
	let httpAcked = -1;
	const ws = await openOk(wsUrl(f.server.baseUrl, `/ws/v1/ingest?runId=${wsRun.runId}`), { authorization: `Bearer ${wsRun.token}` });
	await ws.c.until((m) => m.type === 'hello');
	ws.ws.on('message', (d) => {
		const m = JSON.parse(d.toString());
		if (m.type === 'ack') wsAcked = Math.max(wsAcked, m.highestDurableSeq);
	});
	ws.ws.on('error', () => {});
	let sent = 0;
	const pump = setInterval(() => {
		if (ws.ws.readyState !== ws.ws.OPEN) return;
		for (let k = 0; k < 20 && sent - wsAcked < 5000; k++) {
			ws.ws.send(JSON.stringify({ type: 'readings', readings: all.slice(sent, sent + 100) }));
			sent += 100;
		}
	}, 2);
	const httpLoop = (async () => {
		for (let from = 0; from < 100_000; from += 500) {
			try {
				const res = await fetch(`${f.server.baseUrl}/api/v1/runs/${httpRun.runId}/readings`, { method: 'POST', headers: { authorization: `Bearer ${httpRun.token}`, 'content-type': 'application/json' }, body: JSON.stringify({ readings: all.slice(from, from + 500) }) });
				if (res.ok) httpAcked = Math.max(httpAcked, ((await res.json()) as { highestDurableSeq: number }).highestDurableSeq);
			} catch {
				return; // the server is gone
			}
		}
	})();
	// let both streams run, then kill the process without warning
	const until = Date.now() + 10_000;
	while ((wsAcked < 5000 || httpAcked < 5000) && Date.now() < until) await new Promise((r) => setTimeout(r, 10));
	await new Promise((r) => setTimeout(r, 150));
	await f.server.kill('SIGKILL');
	clearInterval(pump);
	await httpLoop;
	expect(wsAcked).toBeGreaterThan(1000);
	expect(httpAcked).toBeGreaterThan(1000);

	await f.server.restart();
	for (const [run, acked] of [[wsRun, wsAcked], [httpRun, httpAcked]] as const) {
		const rows = await f.db.selectFrom('reading').select('seq').where('run_id', '=', run.runId).orderBy('seq').execute();
		const seqs = rows.map((r) => r.seq);
		// all acknowledged readings present (each client sent in order, so they are 0..acked)
		expect(seqs.filter((s) => s <= acked)).toEqual(Array.from({ length: acked + 1 }, (_, i) => i));
		expect(new Set(seqs).size).toBe(seqs.length);
		const runRow = await f.db.selectFrom('run').select(['reading_count', 'highest_seq']).where('id', '=', run.runId).executeTakeFirstOrThrow();
		expect(runRow.reading_count).toBe(seqs.length);
		expect(runRow.highest_seq).toBe(seqs[seqs.length - 1]);
		// the server tells a reconnecting client where to resume
		const info = await (await fetch(`${f.server.baseUrl}/api/v1/bench/run`, { headers: { authorization: `Bearer ${run.token}` } })).json();
		expect(info.highestDurableSeq).toBe(runRow.highest_seq);
	}
	// resume the WebSocket stream from hello and finish it: no gap, no duplicate
	const again = await openOk(wsUrl(f.server.baseUrl, `/ws/v1/ingest?runId=${wsRun.runId}`), { authorization: `Bearer ${wsRun.token}` });
	const hello = await again.c.until((m) => m.type === 'hello');
	const rest = all.slice(hello.highestDurableSeq + 1, hello.highestDurableSeq + 1 + 1000);
	again.ws.send(JSON.stringify({ type: 'readings', readings: rest }));
	await again.c.until((m) => m.type === 'ack' && m.highestDurableSeq === rest[rest.length - 1].seq);
	again.ws.close();
	const n = await f.readingCount(wsRun.runId);
	expect(n).toBe(rest[rest.length - 1].seq + 1);
	// the plateau detector is rebuilt from the stored readings after the restart
	const live = await openOk(wsUrl(f.server.baseUrl, '/ws/v1/live'), { cookie: await f.cookie() });
	live.ws.send(JSON.stringify({ type: 'subscribe-overview' }));
	const ov = await live.c.until((m) => m.type === 'overview' && m.benches.some((b: any) => b.runId === String(wsRun.runId) && b.detector && !b.detector.rebuilding && b.detector.readings > 1000), 20_000);
	expect(ov).toBeTruthy();
	live.ws.close();
}, 90_000);
