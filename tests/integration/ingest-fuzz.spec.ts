// Thousands of random and mutated payloads at both ingest endpoints: never a 5xx, never a partial
// write (a rejected batch leaves the row count as it was), and the server stays up.
import fc from 'fast-check';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { ingestFixture, openOk, openSocket, readings, wsUrl, type Fixture } from './ingest-fixture';

let f: Fixture;
let run: Awaited<ReturnType<Fixture['recordingRun']>>;
let ratio: number;
beforeAll(async () => {
	f = await ingestFixture({ STILLPOINT_INGEST_RATE_PER_S: '100000', STILLPOINT_INGEST_RATE_BURST: '100000' });
	run = await f.recordingRun(0);
	ratio = f.ratioFor('Ga', 0);
}, 60_000);
afterAll(async () => {
	await f?.close();
});

const weird = fc.oneof(fc.constant(null), fc.constant(-1), fc.constant(0), fc.constant(1e308), fc.constant(-0), fc.constant(2 ** 53), fc.double(), fc.integer(), fc.string({ maxLength: 8 }), fc.boolean(), fc.constant([]), fc.constant({}), fc.constant('NaN'));
const field = fc.constantFrom('seq', 'timeMs', 'ratio', 'currentMilliAmp', 'channel', 'type', '__proto__', 'constructor', 'extra');

/** A good batch with a few fields of a few readings replaced by odd values (or removed). */
const mutatedBatch = (base: number) =>
	fc.record({
		n: fc.integer({ min: 1, max: 40 }),
		edits: fc.array(fc.record({ i: fc.nat(), field, value: fc.option(weird, { nil: undefined }) }), { minLength: 0, maxLength: 4 })
	}).map(({ n, edits }) => {
		const batch: Record<string, unknown>[] = readings(base, n, ratio).map((r) => ({ ...r }));
		for (const e of edits) {
			const r = batch[e.i % n];
			if (e.value === undefined) delete r[e.field];
			else r[e.field] = e.value;
		}
		return batch;
	});

const rawBody = fc.oneof(
	fc.string({ maxLength: 200 }),
	fc.json(),
	fc.jsonValue().map((v) => JSON.stringify({ readings: v })),
	fc.array(fc.jsonValue(), { maxLength: 5 }).map((xs) => xs.map((x) => JSON.stringify(x)).join('\n'))
);

it('HTTP: random bodies and mutated batches never give a 5xx nor a partial write', async () => {
	let base = 0;
	let n = 0;
	await fc.assert(
		fc.asyncProperty(fc.oneof(mutatedBatch(0).map((b) => ({ kind: 'batch' as const, b })), rawBody.map((s) => ({ kind: 'raw' as const, s }))), fc.constantFrom('application/json', 'application/x-ndjson'), async (input, contentType) => {
			n++;
			const before = await f.readingCount(run.runId);
			let body: string;
			let expected = -1;
			if (input.kind === 'batch') {
				// fresh seqs for every case, so an accepted batch is told apart from a duplicate one
				base += 100;
				const batch = input.b.map((r) => (typeof r.seq === 'number' && Number.isInteger(r.seq) && (r.seq as number) >= 0 && (r.seq as number) < 100 ? { ...r, seq: base + (r.seq as number) } : r));
				body = contentType === 'application/json' ? JSON.stringify({ readings: batch }) : batch.map((r) => JSON.stringify(r)).join('\n');
				expected = batch.length;
			} else body = input.s;
			const res = await fetch(`${f.server.baseUrl}/api/v1/runs/${run.runId}/readings`, { method: 'POST', headers: { authorization: `Bearer ${run.token}`, 'content-type': contentType }, body });
			expect(res.status).toBeLessThan(500);
			const j = await res.json();
			const after = await f.readingCount(run.runId);
			if (res.status === 200) expect(after - before).toBe(j.accepted);
			else {
				expect(after).toBe(before); // nothing of a refused batch is stored
				expect(typeof j.error.code).toBe('string');
			}
			if (res.status === 200 && expected >= 0) expect(j.accepted + j.duplicates).toBe(expected);
		}),
		{ numRuns: 1500, seed: 20261202 }
	);
	expect(n).toBe(1500);
}, 180_000);

it('WebSocket: random frames never break the stream; only valid readings are stored', async () => {
	// its own run: the HTTP cases may have stored a valid but huge seq, which would satisfy any ack
	const run = await f.recordingRun(1);
	const sock = await openOk(wsUrl(f.server.baseUrl, `/ws/v1/ingest?runId=${run.runId}`), { authorization: `Bearer ${run.token}` });
	await sock.c.until((m) => m.type === 'hello');
	let validSent = 0;
	const start = 10_000_000;
	let seq = start;
	const frames = fc.sample(
		fc.oneof(
			rawBody,
			mutatedBatch(0).map((b) => JSON.stringify({ type: 'readings', readings: b })),
			mutatedBatch(0).map((b) => JSON.stringify({ type: 'reading', ...b[0] }))
		),
		{ numRuns: 3000, seed: 7 }
	);
	const before = await f.readingCount(run.runId);
	for (const frame of frames) {
		// give each frame's readings fresh seqs and count the ones that are valid
		let parsed: any;
		try {
			parsed = JSON.parse(frame);
		} catch {
			parsed = null;
		}
		if (parsed && (parsed.type === 'readings' || parsed.type === 'reading')) {
			const items = parsed.type === 'reading' ? [parsed] : parsed.readings;
			for (const r of items) {
				if (r && typeof r === 'object') r.seq = typeof r.seq === 'number' && Number.isInteger(r.seq) && r.seq >= 0 ? seq++ : r.seq;
			}
			for (const r of items) {
				const ok = r && typeof r.seq === 'number' && Number.isSafeInteger(r.seq) && r.seq >= 0 && Number.isSafeInteger(r.timeMs) && r.timeMs >= 0 && typeof r.ratio === 'number' && r.ratio > 0 && Number.isFinite(r.ratio) && typeof r.currentMilliAmp === 'number' && r.currentMilliAmp > 0 && r.currentMilliAmp <= 50 && (r.channel === undefined || (Number.isInteger(r.channel) && r.channel >= 0 && r.channel <= 63)) && Object.keys(r).every((k) => ['seq', 'timeMs', 'ratio', 'currentMilliAmp', 'channel', 'type'].includes(k));
				if (ok) validSent++;
			}
			sock.ws.send(JSON.stringify(parsed));
		} else sock.ws.send(frame);
	}
	// a final good reading marks the end
	const last = { type: 'reading', ...readings(seq, 1, ratio)[0] };
	sock.ws.send(JSON.stringify(last));
	await sock.c.until((m) => m.type === 'ack' && m.highestDurableSeq >= seq, 20_000);
	expect(sock.ws.readyState).toBe(sock.ws.OPEN);
	expect(await f.readingCount(run.runId)).toBe(before + validSent + 1);
	sock.ws.close();
	// and the server still answers
	expect((await fetch(`${f.server.baseUrl}/api/v1/health`)).status).toBe(200);
}, 120_000);
