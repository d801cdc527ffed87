// The instrument clients against a loopback peer that implements docs/ingest-protocol.md.

import { afterEach, describe, expect, it } from 'vitest';
import { TestPeer, type PeerOptions } from '../test/peer';
import { runBench, type BenchOptions } from './bench';
import { TokenRefusedError } from './client-common';
import { simulate } from './simulate';

const TOKEN = 'spb_' + 'A'.repeat(43);
let peer: TestPeer | null = null;
afterEach(async () => {
	await peer?.stop();
	peer = null;
});

async function withPeer(o: Partial<PeerOptions> = {}): Promise<TestPeer> {
	peer = new TestPeer({ token: TOKEN, ...o });
	await peer.start();
	return peer;
}

/** A short quick-in-freeze: 0.25 h at 1 s = 901 readings. */
const SHORT = { epochMs: 1_700_000_000_000, durationHours: 0.25 };
const FAST = { baseDelayMs: 20, maxDelayMs: 200, flushIntervalMs: 20 };

function bench(p: TestPeer, extra: Partial<BenchOptions> = {}) {
	return runBench({ scenario: 'quick-in-freeze', overrides: SHORT, seed: 3, target: 'http', url: p.url, token: TOKEN, asFastAsPossible: true, client: { ...FAST, batchSize: 200 }, ...extra });
}

function expectEverySeqOnce(p: TestPeer, n: number) {
	expect(p.stored.size).toBe(n);
	for (let s = 0; s < n; s++) expect(p.stored.has(s), `seq ${s} stored`).toBe(true);
}

describe('HTTP client', () => {
	it('finds the run, sends batches of at most batchSize, and every reading arrives once', async () => {
		const p = await withPeer();
		const n = simulate('quick-in-freeze', SHORT, 3).readings.length;
		const r = await bench(p).done;
		expect(r.readingsEmitted).toBe(n);
		expectEverySeqOnce(p, n);
		expect(p.gets.length).toBe(1);
		expect(p.posts.every((x) => x.seqs.length <= 200)).toBe(true);
		expect(p.posts.length).toBeGreaterThanOrEqual(Math.ceil(n / 200));
		expect(p.duplicates).toBe(0);
		expect(p.violations).toEqual([]);
	});

	it('retries after a dropped connection, a 503 and a 429, waiting out Retry-After', async () => {
		const p = await withPeer({ postScript: ['destroy', { status: 503 }, { status: 429, retryAfterS: 1 }] });
		const n = simulate('quick-in-freeze', SHORT, 3).readings.length;
		await bench(p).done;
		expectEverySeqOnce(p, n);
		const i429 = p.posts.findIndex((x) => x.status === 429);
		expect(i429).toBeGreaterThan(0);
		expect(p.posts[i429 + 1].atMs - p.posts[i429].atMs).toBeGreaterThanOrEqual(950);
		expect(p.posts[i429 + 1].body).toBe(p.posts[i429].body); // the same batch again
	});

	it('does not retry a 422 without details: that batch is dropped, the rest goes on', async () => {
		const p = await withPeer({ postScript: [{ status: 422, body: { error: { code: 'invalid_readings', message: 'scripted' } } }] });
		await bench(p).done;
		const first = p.posts[0];
		expect(first.status).toBe(422);
		expect(p.posts.filter((x) => x.body === first.body).length).toBe(1);
		for (const s of first.seqs) expect(p.stored.has(s)).toBe(false);
		expect(p.stored.size).toBeGreaterThan(0);
	});

	it('bad-values run: 422 names the invalid readings; they are dropped and the others are sent once', async () => {
		const p = await withPeer();
		const overrides = { ...SHORT, fault: 'bad-values' as const, faultAtMinutes: 3, badValueSpacingMinutes: 1 };
		const sim = simulate('quick-in-freeze', overrides, 3);
		await bench(p, { overrides }).done;
		const badSeqs = sim.readings.filter((r) => !(r.ratio > 0)).map((r) => r.seq);
		expect(badSeqs.length).toBe(4); // 2 rounds × (NaN, negative)
		expect(p.posts.some((x) => x.status === 422)).toBe(true);
		for (const s of badSeqs) expect(p.stored.has(s)).toBe(false);
		const good = new Set(sim.readings.map((r) => r.seq).filter((s) => !badSeqs.includes(s)));
		expect(p.stored.size).toBe(good.size);
		const bodies = p.posts.map((x) => x.body);
		expect(new Set(bodies).size).toBe(bodies.length); // never the same request twice
		expect(p.duplicates).toBeGreaterThanOrEqual(2); // the duplicated seqs reached the peer and were deduplicated
	});

	it('a refused token (401 on GET) is fatal and not retried', async () => {
		const p = await withPeer();
		const b = runBench({ scenario: 'quick-in-freeze', overrides: SHORT, target: 'http', url: p.url, token: 'spb_wrong', asFastAsPossible: true, client: FAST });
		await expect(b.done).rejects.toBeInstanceOf(TokenRefusedError);
		expect(p.gets.length).toBe(1);
		expect(p.posts.length).toBe(0);
	});

	it('a 401 on POST (token revoked mid-run) stops the client without a retry', async () => {
		const p = await withPeer({ postScript: [{ status: 200, body: { accepted: 0, duplicates: 0, highestDurableSeq: -1 } }, { status: 401, body: { error: { code: 'invalid_token', message: 'revoked' } } }] });
		await expect(bench(p).done).rejects.toThrow(/refused the bench token/);
		expect(p.posts.length).toBe(2);
	});

	it('disconnect fault: resumes from GET /api/v1/bench/run with no gap and no duplicate', async () => {
		const p = await withPeer();
		const overrides = { ...SHORT, fault: 'disconnect' as const, faultAtMinutes: 5, disconnectSeconds: 60 };
		const n = simulate('quick-in-freeze', overrides, 3).readings.length;
		const r = await bench(p, { overrides }).done;
		expectEverySeqOnce(p, n);
		expect(r.client!.reconnects).toBeGreaterThanOrEqual(1);
		expect(p.gets.length).toBeGreaterThanOrEqual(2);
		expect(p.violations).toEqual([]);
	});

	it('resumes a restarted script after the seq the server already holds', async () => {
		const p = await withPeer();
		const sim = simulate('quick-in-freeze', SHORT, 3).readings;
		for (const r of sim.slice(0, 300)) p.stored.set(r.seq, r);
		const r = await bench(p).done;
		expect(r.skippedAlreadyStored).toBe(300);
		expectEverySeqOnce(p, sim.length);
		expect(p.duplicates).toBe(0);
	});
});

describe('WebSocket client', () => {
	const wsBench = (p: TestPeer, extra: Partial<BenchOptions> = {}) => bench(p, { target: 'ws', client: { ...FAST, batchSize: 50 }, ...extra });

	it('streams with acks; after a server-side disconnect it resumes from hello with no gap or duplicate', async () => {
		const p = await withPeer({ dropWsAfterReadings: 300, commitDelayMs: 30 });
		const n = simulate('quick-in-freeze', SHORT, 3).readings.length;
		const r = await wsBench(p).done;
		expectEverySeqOnce(p, n);
		expect(p.wsConnections).toBeGreaterThanOrEqual(2);
		expect(r.client!.reconnects).toBeGreaterThanOrEqual(1);
		expect(p.violations).toEqual([]);
		for (const [seq, count] of p.arrivals) expect(count, `seq ${seq}`).toBe(1);
	});

	it('bad-values: the peer rejects the NaN and negative readings; the stream goes on', async () => {
		const p = await withPeer();
		const overrides = { ...SHORT, fault: 'bad-values' as const, faultAtMinutes: 3, badValueSpacingMinutes: 1 };
		const sim = simulate('quick-in-freeze', overrides, 3);
		const r = await wsBench(p, { overrides }).done;
		const badSeqs = sim.readings.filter((x) => !(x.ratio > 0)).map((x) => x.seq);
		expect(p.wsRejected.sort()).toEqual(badSeqs.sort());
		expect(r.client!.rejected).toBe(badSeqs.length);
		expect(p.stored.size).toBe(new Set(sim.readings.map((x) => x.seq)).size - badSeqs.length);
	});

	it('an upgrade refused with 401 is fatal', async () => {
		const p = await withPeer();
		const b = runBench({ scenario: 'quick-in-freeze', overrides: SHORT, target: 'ws', url: p.url, token: 'spb_wrong', runId: 'run-test-1', asFastAsPossible: true, client: FAST });
		await expect(b.done).rejects.toBeInstanceOf(TokenRefusedError);
		expect(p.wsConnections).toBe(0);
	});
});

describe('bad-value faults in the simulated output', () => {
	it('emit NaN, a negative ratio, a duplicated seq and a time going backwards, listed in the truth', () => {
		const { readings, events, truth } = simulate('in-freeze-bad-values', { epochMs: 0, durationHours: 2.5 }, 1);
		expect(readings.some((r) => Number.isNaN(r.ratio))).toBe(true);
		expect(readings.some((r) => r.ratio < 0)).toBe(true);
		expect(readings.some((r, i) => i > 0 && r.seq === readings[i - 1].seq)).toBe(true);
		expect(readings.some((r, i) => i > 0 && r.timeMs < readings[i - 1].timeMs)).toBe(true);
		expect(events.filter((e) => e.kind === 'fault-bad-value').length).toBe(8);
		expect(truth.faults.badValues.map((b) => b.kind).sort()).toEqual(['duplicate', 'duplicate', 'nan', 'nan', 'negative', 'negative', 'out-of-order', 'out-of-order']);
	});

	it('dropout leaves a silent gap in time but not in seq', () => {
		const { readings, truth } = simulate('zn-freeze-dropout', { epochMs: 0, durationHours: 3 }, 1);
		const gapMs = Math.max(...readings.slice(1).map((r, i) => r.timeMs - readings[i].timeMs));
		expect(gapMs).toBeGreaterThanOrEqual(20 * 60_000);
		expect(readings.every((r, i) => r.seq === i)).toBe(true);
		expect(truth.faults.dropouts.length).toBe(1);
	});

	it('drift: after furnace control is lost the reading climbs by millikelvins within the hour', () => {
		const { readings, truth } = simulate('zn-freeze-drift', { epochMs: 0, durationHours: 4, outlierProbability: 0 }, 1);
		const lost = truth.faults.furnaceControlLostMs!;
		const w = (from: number, to: number) => {
			const xs = readings.filter((r) => r.timeMs >= from && r.timeMs < to && r.currentMilliAmp === 1).map((r) => r.ratio);
			return xs.reduce((a, b) => a + b, 0) / xs.length;
		};
		const before = w(lost - 20 * 60_000, lost);
		const after = w(lost + 60 * 60_000, lost + 70 * 60_000);
		// ratio → kelvin: dR/dT ≈ R_TPW × 3.6e-3 /K near Zn, over R_s = 25 Ω
		const riseMilliKelvin = ((after - before) * 25) / (truth.thermometer.rTpwOhm * 3.6e-3) * 1000;
		expect(riseMilliKelvin).toBeGreaterThan(2);
	});
});
