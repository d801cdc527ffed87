import { describe, expect, it } from 'vitest';
import { LiveClient } from './client';
import type { LiveReading } from './protocol';

class FakeSocket {
	static all: FakeSocket[] = [];
	readyState = 0;
	sent: any[] = [];
	onopen: (() => void) | null = null;
	onmessage: ((e: { data: string }) => void) | null = null;
	onclose: ((e: { code: number }) => void) | null = null;
	constructor(readonly url: string) {
		FakeSocket.all.push(this);
	}
	send(d: string) {
		this.sent.push(JSON.parse(d));
	}
	close() {}
	open() {
		this.readyState = 1;
		this.onopen?.();
	}
	push(m: object) {
		this.onmessage?.({ data: JSON.stringify(m) });
	}
	drop() {
		this.readyState = 3;
		this.onclose?.({ code: 1006 });
	}
}
const r = (seq: number) => ({ seq, timeMs: seq, ratio: 1, currentMilliAmp: 1, channel: 1, resistanceOhm: 1, w: 1, t90Kelvin: 300, deltaMilliKelvin: 0 }) satisfies LiveReading;
const wait = (ms: number) => new Promise((res) => setTimeout(res, ms));

describe('LiveClient', () => {
	it('resubscribes after a reconnect from the seq after the last one delivered, and never delivers a seq twice', async () => {
		FakeSocket.all = [];
		const states: string[] = [];
		const client = new LiveClient({ url: 'ws://x/ws/v1/live', WebSocketImpl: FakeSocket as unknown as typeof WebSocket, baseDelayMs: 5, maxDelayMs: 10, random: () => 0.5, onState: (s) => states.push(s) });
		const got: number[] = [];
		client.subscribe('7', { onReadings: (rs) => got.push(...rs.map((x) => x.seq)) });
		const a = FakeSocket.all[0];
		a.open();
		expect(a.sent).toEqual([{ type: 'subscribe', runId: '7' }]);
		a.push({ type: 'readings', runId: '7', source: 'history', readings: [r(0), r(1)], skipped: 0, detector: null });
		a.push({ type: 'readings', runId: '7', source: 'live', readings: [r(2)], skipped: 0, detector: null });
		a.drop();
		expect(states).toContain('waiting');
		await wait(30);
		const b = FakeSocket.all[1];
		expect(b).toBeDefined();
		b.open();
		expect(b.sent).toEqual([{ type: 'subscribe', runId: '7', fromSeq: 3 }]);
		b.push({ type: 'readings', runId: '7', source: 'history', readings: [r(2), r(3)], skipped: 0, detector: null });
		expect(got).toEqual([0, 1, 2, 3]);
		client.close();
		expect(client.state).toBe('closed');
	});

	it('backs off exponentially while the server cannot be reached', async () => {
		FakeSocket.all = [];
		const client = new LiveClient({ url: 'ws://x', WebSocketImpl: FakeSocket as unknown as typeof WebSocket, baseDelayMs: 10, maxDelayMs: 1000, random: () => 1 });
		const t0 = Date.now();
		FakeSocket.all[0].drop(); // 10 ms
		await wait(15);
		FakeSocket.all[1].drop(); // 20 ms
		await wait(25);
		FakeSocket.all[2].drop(); // 40 ms
		await wait(20);
		expect(FakeSocket.all).toHaveLength(3);
		await wait(30);
		expect(FakeSocket.all).toHaveLength(4);
		expect(Date.now() - t0).toBeGreaterThanOrEqual(70);
		client.close();
	});
});
