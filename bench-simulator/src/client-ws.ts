// WebSocket instrument client for /ws/v1/ingest: streams reading frames, drops what each ack covers,
// and after any reconnect resends from the hello frame's highestDurableSeq + 1.

import WebSocket from 'ws';
import type { IncomingMessage } from 'node:http';
import {
	BaseIngestClient,
	backoffDelayMs,
	getBenchRun,
	isRetryableStatus,
	parseRetryAfterMs,
	RunUnavailableError,
	sleep,
	TokenRefusedError,
	type ClientOptions,
	type IngestClient
} from './client-common';
import type { SimReading } from './types';

/** The server pings every 15 s; silence this long means a dead link. */
const SILENCE_LIMIT_MS = 45_000;

type ServerFrame =
	| { type: 'hello'; runId: string; highestDurableSeq: number }
	| { type: 'ack'; highestDurableSeq: number }
	| { type: 'rejected'; seq: number; errors?: unknown[] }
	| { type: 'error'; code: string; message: string };

export class WsIngestClient extends BaseIngestClient implements IngestClient {
	private readonly frameSize: number;
	private ws: WebSocket | null = null;
	/** How many buffered readings went out on the current connection. */
	private sentCount = 0;
	private ready = false;
	private stopped = false;
	private downUntilMs = 0;
	private firstHello: ((h: number) => void) | null = null;
	private loopDone: Promise<void> | null = null;
	private silenceTimer: NodeJS.Timeout | null = null;
	private connectionClosed: (() => void) | null = null;

	constructor(o: ClientOptions) {
		super(o);
		this.frameSize = Math.min(o.batchSize ?? 200, 2000); // 2000 × ~100 B stays far below 256 KiB
	}

	async start(): Promise<{ runId: string; highestDurableSeq: number }> {
		if (!this.runId) this.runId = (await getBenchRun(this.o)).runId;
		const hello = new Promise<number>((resolve) => (this.firstHello = resolve));
		this.loopDone = this.connectLoop().catch((e: Error) => this.fail(e));
		const h = await Promise.race([hello, this.failed]);
		return { runId: this.runId, highestDurableSeq: h };
	}

	async enqueue(r: SimReading): Promise<void> {
		await this.buffer.push(r);
		this.pump();
	}

	disconnectFor(ms: number): void {
		this.downUntilMs = Date.now() + ms;
		this.log(`link down for ${ms} ms (simulated)`);
		this.ws?.terminate();
	}

	async finish(timeoutMs = 60_000): Promise<void> {
		const until = Date.now() + timeoutMs;
		while (this.buffer.length > 0 && Date.now() < until && !this.stopped) {
			this.pump();
			await Promise.race([sleep(20), this.failed]);
		}
		if (this.buffer.length > 0) throw new Error(`${this.buffer.length} readings still unacknowledged after ${timeoutMs} ms`);
	}

	async close(): Promise<void> {
		this.stopped = true;
		this.ws?.close(1000, 'instrument script finished');
		this.connectionClosed?.();
		await this.loopDone;
	}

	private url(): string {
		const u = new URL('/ws/v1/ingest', this.o.url);
		u.protocol = u.protocol === 'https:' ? 'wss:' : 'ws:';
		u.searchParams.set('runId', this.runId!);
		return u.toString();
	}

	private async connectLoop(): Promise<void> {
		for (let attempt = 0; !this.stopped; ) {
			const downMs = this.downUntilMs - Date.now();
			if (downMs > 0) await sleep(downMs);
			if (this.stopped) break;
			const outcome = await this.connectOnce();
			if (this.stopped) break;
			if (outcome.helloSeen) attempt = 0;
			const wait = outcome.retryAfterMs ?? backoffDelayMs(attempt++, this.o.baseDelayMs ?? 500, this.o.maxDelayMs ?? 30_000, this.o.random);
			this.s.reconnects++;
			this.log(`${outcome.reason}; reconnecting in ${Math.round(wait)} ms`);
			await sleep(wait);
		}
	}

	/** One connection from upgrade to close; throws for fatal refusals. */
	private connectOnce(): Promise<{ helloSeen: boolean; reason: string; retryAfterMs?: number }> {
		return new Promise((resolve, reject) => {
			let helloSeen = false;
			let settled = false;
			const done = (v: { helloSeen: boolean; reason: string; retryAfterMs?: number }) => {
				if (settled) return;
				settled = true;
				this.ready = false;
				this.ws = null;
				if (this.silenceTimer) clearTimeout(this.silenceTimer);
				resolve(v);
			};
			const fatal = (e: Error) => {
				if (settled) return;
				settled = true;
				this.ready = false;
				this.stopped = true;
				ws.terminate();
				reject(e);
			};
			const ws = new WebSocket(this.url(), { headers: { authorization: `Bearer ${this.o.token}` }, maxPayload: 256 * 1024 });
			this.ws = ws;
			this.connectionClosed = () => done({ helloSeen, reason: 'closed by client' });
			const armSilence = () => {
				if (this.silenceTimer) clearTimeout(this.silenceTimer);
				this.silenceTimer = setTimeout(() => ws.terminate(), SILENCE_LIMIT_MS);
			};
			ws.on('unexpected-response', (_req, res: IncomingMessage) => {
				const status = res.statusCode ?? 0;
				let text = '';
				res.on('data', (c: Buffer) => (text += c.toString()));
				res.on('end', () => {
					let code = `http_${status}`;
					let message = res.statusMessage ?? '';
					try {
						const j = JSON.parse(text) as { error?: { code?: string; message?: string } };
						code = j.error?.code ?? code;
						message = j.error?.message ?? message;
					} catch {
						/* not JSON: keep the status line */
					}
					if (status === 401 || status === 403) fatal(new TokenRefusedError(status, code, `WebSocket upgrade refused: the server refused the bench token (${status} ${code}: ${message})`));
					else if (status === 404) fatal(new RunUnavailableError(status, code, `WebSocket upgrade: ${code}: ${message}`));
					else if (isRetryableStatus(status)) done({ helloSeen, reason: `upgrade answered ${status}`, retryAfterMs: parseRetryAfterMs(res.headers['retry-after'] as string | undefined) ?? undefined });
					else fatal(new RunUnavailableError(status, code, `WebSocket upgrade refused with ${status} ${code}: ${message}`));
				});
			});
			ws.on('open', armSilence);
			ws.on('ping', armSilence);
			ws.on('message', (data) => {
				armSilence();
				let f: ServerFrame;
				try {
					f = JSON.parse(data.toString()) as ServerFrame;
				} catch {
					return;
				}
				this.onFrame(f, () => {
					helloSeen = true;
				}, fatal);
			});
			ws.on('close', (code, reason) => {
				if (code === 4401 || code === 4403) {
					fatal(new TokenRefusedError(code === 4401 ? 401 : 403, `close_${code}`, `the server closed the stream: ${reason.toString() || code} (token refused or run no longer recording)`));
					return;
				}
				done({ helloSeen, reason: `connection closed (${code}${reason.length ? ' ' + reason.toString() : ''})` });
			});
			ws.on('error', (e) => {
				if (!settled && ws.readyState !== WebSocket.OPEN) done({ helloSeen, reason: `connection failed (${e.message})` });
			});
		});
	}

	private onFrame(f: ServerFrame, sawHello: () => void, fatal: (e: Error) => void) {
		switch (f.type) {
			case 'hello': {
				sawHello();
				this.s.highestDurableSeq = Math.max(this.s.highestDurableSeq, f.highestDurableSeq);
				this.buffer.trimThrough(f.highestDurableSeq);
				this.sentCount = 0; // resend whatever the server does not hold
				this.ready = true;
				if (this.firstHello) {
					this.firstHello(f.highestDurableSeq);
					this.firstHello = null;
				} else this.log(`reconnected; resuming after seq ${f.highestDurableSeq}`);
				this.pump();
				break;
			}
			case 'ack': {
				this.s.highestDurableSeq = Math.max(this.s.highestDurableSeq, f.highestDurableSeq);
				const n = this.buffer.trimThrough(f.highestDurableSeq);
				this.s.acknowledged += n;
				this.sentCount = Math.max(0, this.sentCount - n);
				this.pump();
				break;
			}
			case 'rejected': {
				const idx = this.buffer.items.findIndex((r) => r.seq === f.seq);
				if (idx >= 0) {
					this.buffer.items.splice(idx, 1);
					if (idx < this.sentCount) this.sentCount--;
				}
				this.s.rejected++;
				this.log(`reading seq ${f.seq} rejected: ${JSON.stringify(f.errors ?? [])}`);
				break;
			}
			case 'error':
				this.log(`server error ${f.code}: ${f.message}`);
				if (f.code === 'invalid_token' || f.code === 'forbidden' || f.code === 'run_not_recording') {
					fatal(new TokenRefusedError(f.code === 'invalid_token' ? 401 : 403, f.code, `the server refused the stream: ${f.code}: ${f.message}`));
				}
				break;
		}
	}

	private pump(): void {
		const ws = this.ws;
		if (!ws || !this.ready || ws.readyState !== WebSocket.OPEN) return;
		while (this.sentCount < this.buffer.length && ws.bufferedAmount < 1 << 20) {
			const chunk = this.buffer.items.slice(this.sentCount, this.sentCount + this.frameSize);
			ws.send(JSON.stringify({ type: 'readings', readings: chunk }));
			this.sentCount += chunk.length;
			this.s.sent += chunk.length;
		}
	}
}
