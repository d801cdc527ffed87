// A loopback test peer that speaks docs/ingest-protocol.md (server side) closely enough to test the
// instrument client against: in-memory store, dedup by seq, group-commit acks, scripted failures.
// Test support only; the product's ingest lives in src/lib/server.

import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo, Socket } from 'node:net';
import { WebSocketServer, type WebSocket } from 'ws';

export interface Stored {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel?: number;
}

export type ScriptedResponse = { status: number; retryAfterS?: number; body?: unknown } | 'destroy';

export interface PeerOptions {
	token: string;
	runId?: string;
	/** Responses for the first POSTs, in order; after that the peer behaves. */
	postScript?: ScriptedResponse[];
	/** Response for GET /api/v1/bench/run calls, in order (then normal). */
	getScript?: ScriptedResponse[];
	/** Terminate the first WebSocket connection after it has received this many readings. */
	dropWsAfterReadings?: number;
	/** Delay of the "group commit" before an ack, ms. */
	commitDelayMs?: number;
}

const bad = (field: string, value: unknown, reason: string) => ({ field, value: value === undefined ? null : value, reason });

export function validateReading(r: Record<string, unknown>): { field: string; value: unknown; reason: string }[] {
	const errs = [];
	if (!Number.isInteger(r.seq) || (r.seq as number) < 0) errs.push(bad('seq', r.seq, 'must be an integer ≥ 0'));
	if (!Number.isInteger(r.timeMs)) errs.push(bad('timeMs', r.timeMs, 'must be an integer'));
	if (typeof r.ratio !== 'number' || !Number.isFinite(r.ratio) || r.ratio <= 0) errs.push(bad('ratio', r.ratio, 'must be a finite number > 0'));
	if (typeof r.currentMilliAmp !== 'number' || !(r.currentMilliAmp > 0 && r.currentMilliAmp <= 50)) errs.push(bad('currentMilliAmp', r.currentMilliAmp, 'must be > 0 and ≤ 50'));
	if (r.channel !== undefined && !(Number.isInteger(r.channel) && (r.channel as number) >= 0 && (r.channel as number) <= 63)) errs.push(bad('channel', r.channel, 'must be 0–63'));
	return errs;
}

export class TestPeer {
	readonly stored = new Map<number, Stored>();
	/** How many times each seq arrived at all (stored, duplicate or re-sent). */
	readonly arrivals = new Map<number, number>();
	readonly posts: { body: string; status: number; atMs: number; seqs: number[] }[] = [];
	readonly gets: { status: number; atMs: number }[] = [];
	readonly wsRejected: number[] = [];
	readonly violations: string[] = [];
	wsConnections = 0;
	duplicates = 0;
	private readonly server = createServer((req, res) => void this.http(req, res));
	private readonly wss = new WebSocketServer({ noServer: true, maxPayload: 256 * 1024 });
	private readonly sockets = new Set<Socket>();
	private wsDropped = false;
	url = '';

	constructor(private readonly o: PeerOptions) {
		this.server.on('connection', (s) => {
			this.sockets.add(s);
			s.on('close', () => this.sockets.delete(s));
		});
		this.server.on('upgrade', (req, socket, head) => this.upgrade(req, socket as Socket, head));
	}

	get runId() {
		return this.o.runId ?? 'run-test-1';
	}
	get highestDurableSeq(): number {
		let h = -1;
		for (const k of this.stored.keys()) if (k > h) h = k;
		return h;
	}

	async start(): Promise<string> {
		await new Promise<void>((r) => this.server.listen(0, '127.0.0.1', r));
		this.url = `http://127.0.0.1:${(this.server.address() as AddressInfo).port}`;
		return this.url;
	}

	async stop(): Promise<void> {
		for (const c of this.wss.clients) c.terminate();
		for (const s of this.sockets) s.destroy();
		await new Promise<void>((r) => this.server.close(() => r()));
	}

	private authorized(req: IncomingMessage): boolean {
		return req.headers.authorization === `Bearer ${this.o.token}`;
	}

	private send(res: ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) {
		res.writeHead(status, { 'content-type': 'application/json', ...headers });
		res.end(JSON.stringify(body));
	}

	private scripted(res: ServerResponse, s: ScriptedResponse): number {
		if (s === 'destroy') {
			res.socket?.destroy();
			return 0;
		}
		this.send(res, s.status, s.body ?? { error: { code: `http_${s.status}`, message: 'scripted' } }, s.retryAfterS !== undefined ? { 'retry-after': String(s.retryAfterS) } : {});
		return s.status;
	}

	private store(r: Stored): 'stored' | 'duplicate' {
		this.arrivals.set(r.seq, (this.arrivals.get(r.seq) ?? 0) + 1);
		if (this.stored.has(r.seq)) {
			this.duplicates++;
			return 'duplicate';
		}
		this.stored.set(r.seq, r);
		return 'stored';
	}

	private async http(req: IncomingMessage, res: ServerResponse) {
		const chunks: Buffer[] = [];
		for await (const c of req) chunks.push(c as Buffer);
		const text = Buffer.concat(chunks).toString();
		const now = Date.now();
		if (req.method === 'GET' && req.url === '/api/v1/bench/run') {
			const s = this.o.getScript?.shift();
			if (s) return void this.gets.push({ status: this.scripted(res, s), atMs: now });
			if (!this.authorized(req)) {
				this.gets.push({ status: 401, atMs: now });
				return this.send(res, 401, { error: { code: 'invalid_token', message: 'bad or missing token' } });
			}
			this.gets.push({ status: 200, atMs: now });
			return this.send(res, 200, { benchId: 'bench-1', runId: this.runId, state: 'recording', highestDurableSeq: this.highestDurableSeq });
		}
		const m = /^\/api\/v1\/runs\/([^/]+)\/readings$/.exec(req.url ?? '');
		if (req.method === 'POST' && m) {
			let seqs: number[] = [];
			let parsed: { readings?: Record<string, unknown>[] } | null = null;
			try {
				parsed = JSON.parse(text);
				seqs = (parsed!.readings ?? []).map((r) => r.seq as number);
			} catch {
				parsed = null;
			}
			const record = (status: number) => this.posts.push({ body: text, status, atMs: now, seqs });
			const s = this.o.postScript?.shift();
			if (s) return record(this.scripted(res, s));
			if (!this.authorized(req)) {
				record(401);
				return this.send(res, 401, { error: { code: 'invalid_token', message: 'bad or missing token' } });
			}
			if (m[1] !== this.runId) {
				record(404);
				return this.send(res, 404, { error: { code: 'not_found', message: 'no such run' } });
			}
			if (!parsed || !Array.isArray(parsed.readings)) {
				record(400);
				return this.send(res, 400, { error: { code: 'bad_request', message: 'not JSON' } });
			}
			const details = parsed.readings.flatMap((r, index) => validateReading(r).map((e) => ({ index, seq: r.seq, ...e })));
			if (details.length) {
				record(422);
				return this.send(res, 422, { error: { code: 'invalid_readings', message: `${details.length} invalid`, details } });
			}
			const h0 = this.highestDurableSeq;
			let accepted = 0, duplicates = 0;
			for (const r of parsed.readings) {
				if ((r.seq as number) <= h0 && !this.stored.has(r.seq as number)) this.violations.push(`seq ${r.seq} below the durable mark but never stored`);
				if (this.store(r as unknown as Stored) === 'stored') accepted++;
				else duplicates++;
			}
			record(200);
			return this.send(res, 200, { accepted, duplicates, highestDurableSeq: this.highestDurableSeq });
		}
		this.send(res, 404, { error: { code: 'not_found', message: 'no route' } });
	}

	private upgrade(req: IncomingMessage, socket: Socket, head: Buffer) {
		const u = new URL(req.url ?? '', 'http://x');
		const refuse = (status: number, code: string) => {
			const body = JSON.stringify({ error: { code, message: code } });
			socket.end(`HTTP/1.1 ${status} Refused\r\ncontent-type: application/json\r\ncontent-length: ${Buffer.byteLength(body)}\r\nconnection: close\r\n\r\n${body}`);
		};
		if (u.pathname !== '/ws/v1/ingest') return refuse(404, 'not_found');
		if (!this.authorized(req)) return refuse(401, 'invalid_token');
		if (u.searchParams.get('runId') !== this.runId) return refuse(404, 'not_found');
		this.wss.handleUpgrade(req, socket, head, (ws) => this.connection(ws));
	}

	private connection(ws: WebSocket) {
		this.wsConnections++;
		const first = this.wsConnections === 1;
		const hello = this.highestDurableSeq;
		const seen = new Set<number>();
		let received = 0;
		let commitTimer: NodeJS.Timeout | null = null;
		ws.send(JSON.stringify({ type: 'hello', runId: this.runId, highestDurableSeq: hello }));
		ws.on('message', (data) => {
			const f = JSON.parse(data.toString()) as { type: string; readings?: Record<string, unknown>[] } & Record<string, unknown>;
			const list = f.type === 'readings' ? (f.readings ?? []) : f.type === 'reading' ? [f] : [];
			for (const r of list) {
				const seq = r.seq as number;
				if (seq <= hello) this.violations.push(`seq ${seq} re-sent after hello acknowledged ${hello}`);
				if (seen.has(seq)) this.violations.push(`seq ${seq} sent twice on one connection`);
				seen.add(seq);
				const errors = validateReading(r);
				if (errors.length) {
					this.wsRejected.push(seq);
					ws.send(JSON.stringify({ type: 'rejected', seq, errors }));
					continue;
				}
				this.store(r as unknown as Stored);
				received++;
			}
			if (first && !this.wsDropped && this.o.dropWsAfterReadings !== undefined && received >= this.o.dropWsAfterReadings) {
				this.wsDropped = true;
				ws.terminate(); // server-side disconnect before the pending commit is acked
				return;
			}
			commitTimer ??= setTimeout(() => {
				commitTimer = null;
				if (ws.readyState === ws.OPEN) ws.send(JSON.stringify({ type: 'ack', highestDurableSeq: this.highestDurableSeq }));
			}, this.o.commitDelayMs ?? 20);
		});
	}
}
