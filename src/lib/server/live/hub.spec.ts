import { describe, expect, it } from 'vitest';
import type { LiveReading } from '$lib/live/protocol';
import { HIGH_WATER_BYTES, LiveHub, PENDING_READINGS_CAP, Subscriber } from './hub';

class FakeSocket {
	messages: any[] = [];
	bufferedAmount = 0;
	send(data: string) {
		this.messages.push(JSON.parse(data));
	}
}
const r = (seq: number): LiveReading => ({ seq, timeMs: seq, ratio: 1, currentMilliAmp: 1, channel: 1, resistanceOhm: null, w: null, t90Kelvin: null, deltaMilliKelvin: null });
const tick = () => new Promise((res) => setImmediate(res));

describe('LiveHub', () => {
	it('sends history first, then live readings, without repeating what the history held', async () => {
		const hub = new LiveHub();
		const s = new FakeSocket();
		const sub = new Subscriber(s);
		const rows = [r(0), r(1), r(2)];
		let pos = 0;
		hub.subscribeRun(sub, 7, { skipped: 0, throughSeq: 2, next: (max) => (pos >= rows.length ? null : rows.slice(pos, (pos += max))) }, null);
		hub.publishRun(7, [r(2), r(3)], null); // the reducer lagging: seq 2 was in the history
		await tick();
		expect(s.messages.map((m) => m.type)).toEqual(['readings', 'synced', 'readings']);
		expect(s.messages[0]).toMatchObject({ source: 'history' });
		expect(s.messages[2].readings.map((x: LiveReading) => x.seq)).toEqual([3]);
		hub.close();
	});

	it('decimates and coalesces for a congested subscriber, and one slow subscriber does not hold up another', async () => {
		const hub = new LiveHub();
		const slowSocket = new FakeSocket();
		const fastSocket = new FakeSocket();
		const slow = new Subscriber(slowSocket);
		const fast = new Subscriber(fastSocket);
		hub.subscribeRun(slow, 1, null, null);
		hub.subscribeRun(fast, 1, null, null);
		slowSocket.bufferedAmount = HIGH_WATER_BYTES + 1;
		let seq = 0;
		for (let k = 0; k < 50; k++) {
			hub.publishRun(1, Array.from({ length: 200 }, () => r(seq++)), { state: `s${k}` } as never);
			await tick();
		}
		// The fast one got everything as it came.
		const fastSeqs = fastSocket.messages.flatMap((m) => m.readings.map((x: LiveReading) => x.seq));
		expect(fastSeqs).toEqual(Array.from({ length: seq }, (_, i) => i));
		// The slow one got nothing while congested, and holds a bounded, decimated backlog.
		expect(slowSocket.messages).toHaveLength(0);
		const backlog = slow.runs.get(1)!.pending;
		expect(backlog.length).toBeLessThanOrEqual(PENDING_READINGS_CAP);
		expect(backlog[backlog.length - 1].seq).toBe(seq - 1);
		// Drained: the slow one gets the decimated readings, the skipped count and only the newest state.
		slowSocket.bufferedAmount = 0;
		await new Promise((res) => setTimeout(res, 60));
		const got = slowSocket.messages.filter((m) => m.type === 'readings');
		expect(got.reduce((n, m) => n + m.readings.length, 0) + got.reduce((n, m) => n + m.skipped, 0)).toBe(seq);
		expect(got[0].skipped).toBeGreaterThan(0);
		expect(got[got.length - 1].detector).toEqual({ state: 's49' });
		hub.close();
	});

	it('sends a subscriber that keeps up every reading, even when one update carries more than the congested cap', async () => {
		// The reducer coalesces commits when it falls behind, so one update may hold thousands of readings.
		const hub = new LiveHub();
		const socket = new FakeSocket();
		const sub = new Subscriber(socket);
		hub.subscribeRun(sub, 1, null, null);
		const n = PENDING_READINGS_CAP * 3 + 7;
		hub.publishRun(1, Array.from({ length: n }, (_, i) => r(i)), null);
		for (let k = 0; k < 10; k++) await tick();
		const seqs = socket.messages.flatMap((m) => m.readings.map((x: LiveReading) => x.seq));
		expect(seqs).toEqual(Array.from({ length: n }, (_, i) => i));
		expect(socket.messages.every((m) => m.skipped === 0)).toBe(true);
		expect(sub.decimated).toBe(0);
		hub.close();
	});

	it('sends at most a few messages per subscriber per flush', async () => {
		const hub = new LiveHub();
		const s = new FakeSocket();
		const sub = new Subscriber(s);
		for (let i = 0; i < 20; i++) hub.subscribeRun(sub, i + 1, null, null);
		for (let i = 0; i < 20; i++) hub.publishRun(i + 1, [r(0)], null);
		hub.flush();
		expect(s.messages.length).toBe(8);
		await tick();
		await tick();
		await tick();
		expect(s.messages.length).toBe(20);
		hub.close();
	});
});
