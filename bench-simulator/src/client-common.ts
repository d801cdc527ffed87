// Pieces shared by the HTTP and WebSocket instrument clients: errors, backoff, the bounded buffer of
// unacknowledged readings, and run discovery (GET /api/v1/bench/run).

import type { SimReading } from './types';

/** 401/403: the server refused the bench token (or the run is not this bench's / not recording). */
export class TokenRefusedError extends Error {
	constructor(readonly status: number, readonly code: string, message: string) {
		super(message);
		this.name = 'TokenRefusedError';
	}
}

/** No active run for the bench, or the run is gone: nothing to send to. */
export class RunUnavailableError extends Error {
	constructor(readonly status: number, readonly code: string, message: string) {
		super(message);
		this.name = 'RunUnavailableError';
	}
}

export interface ClientOptions {
	/** Base URL of Stillpoint, e.g. http://127.0.0.1:5173 */
	url: string;
	token: string;
	/** Run id; found with GET /api/v1/bench/run when absent. */
	runId?: string;
	/** Readings per HTTP request or WebSocket frame (protocol limit 5000). */
	batchSize?: number;
	/** Longest wait before a partial batch is sent, ms. */
	flushIntervalMs?: number;
	/** Unacknowledged readings kept; enqueue() waits when full (backpressure). */
	bufferCapacity?: number;
	baseDelayMs?: number;
	maxDelayMs?: number;
	log?: (message: string) => void;
	/** For tests: replace Math.random in the jitter. */
	random?: () => number;
}

export interface ClientStats {
	sent: number;
	acknowledged: number;
	duplicates: number;
	rejected: number;
	retries: number;
	reconnects: number;
	highestDurableSeq: number;
}

export interface IngestClient {
	/** Connects / finds the run; resolves with the server's highestDurableSeq (resume from +1). */
	start(): Promise<{ runId: string; highestDurableSeq: number }>;
	/** Buffers one reading for sending; waits while the buffer is full. */
	enqueue(r: SimReading): Promise<void>;
	/** Sends everything buffered and waits until the server has acknowledged it. */
	finish(timeoutMs?: number): Promise<void>;
	/** Drop the link now and keep it down for ms (the disconnect fault). */
	disconnectFor(ms: number): void;
	close(): Promise<void>;
	stats(): ClientStats;
	/** Rejects when the client hits a fatal error (token refused, run gone). */
	readonly failed: Promise<never>;
}

export const sleep = (ms: number, signal?: { aborted: boolean }) =>
	new Promise<void>((resolve) => {
		if (signal?.aborted || ms <= 0) return resolve();
		setTimeout(resolve, ms);
	});

/** Exponential backoff with "equal jitter": half the cap fixed, half random, so retries spread out
 *  but never collapse to zero. */
export function backoffDelayMs(attempt: number, baseMs: number, maxMs: number, random: () => number = Math.random): number {
	const cap = Math.min(maxMs, baseMs * 2 ** Math.min(attempt, 30));
	return cap / 2 + random() * (cap / 2);
}

/** Retry-After as seconds or an HTTP date; null when absent or unreadable. */
export function parseRetryAfterMs(value: string | null | undefined, nowMs = Date.now()): number | null {
	if (!value) return null;
	const s = Number(value.trim());
	if (Number.isFinite(s) && s >= 0) return s * 1000;
	const date = Date.parse(value);
	return Number.isFinite(date) ? Math.max(0, date - nowMs) : null;
}

export const isRetryableStatus = (status: number) => status === 429 || status >= 500;

/** Readings sent or not yet sent that the server has not acknowledged, oldest first. */
export class UnackedBuffer {
	items: SimReading[] = [];
	private waiters: (() => void)[] = [];
	constructor(readonly capacity: number) {}

	get length(): number {
		return this.items.length;
	}
	async push(r: SimReading): Promise<void> {
		while (this.items.length >= this.capacity) await new Promise<void>((res) => this.waiters.push(res));
		this.items.push(r);
	}
	private wake() {
		const w = this.waiters.splice(0);
		for (const f of w) f();
	}
	/** Drops everything the server holds durably (seq ≤ highestDurableSeq); returns how many. */
	trimThrough(highestDurableSeq: number): number {
		const before = this.items.length;
		this.items = this.items.filter((r) => r.seq > highestDurableSeq);
		if (this.items.length !== before) this.wake();
		return before - this.items.length;
	}
	remove(predicate: (r: SimReading) => boolean): number {
		const before = this.items.length;
		this.items = this.items.filter((r) => !predicate(r));
		if (this.items.length !== before) this.wake();
		return before - this.items.length;
	}
}

export interface BenchRunInfo {
	benchId: string;
	runId: string;
	state: string;
	highestDurableSeq: number;
}

export function authHeaders(token: string): Record<string, string> {
	return { authorization: `Bearer ${token}` };
}

async function errorBody(res: Response): Promise<{ code: string; message: string; details?: unknown }> {
	try {
		const j = (await res.json()) as { error?: { code?: string; message?: string; details?: unknown } };
		return { code: j.error?.code ?? `http_${res.status}`, message: j.error?.message ?? res.statusText, details: j.error?.details };
	} catch {
		return { code: `http_${res.status}`, message: res.statusText };
	}
}

/** Throws the fatal errors for a refused request; returns normally for anything retryable. */
export async function raiseFatal(res: Response, what: string): Promise<{ code: string; message: string; details?: unknown }> {
	const body = await errorBody(res);
	if (res.status === 401 || res.status === 403) {
		throw new TokenRefusedError(res.status, body.code, `${what}: the server refused the bench token (${res.status} ${body.code}: ${body.message})`);
	}
	if (res.status === 404) throw new RunUnavailableError(404, body.code, `${what}: ${body.code}: ${body.message}`);
	return body;
}

/** GET /api/v1/bench/run with retries on network errors, 5xx and 429. */
export async function getBenchRun(o: ClientOptions, stop: { aborted: boolean } = { aborted: false }): Promise<BenchRunInfo> {
	const log = o.log ?? (() => {});
	for (let attempt = 0; ; attempt++) {
		let res: Response;
		try {
			res = await fetch(new URL('/api/v1/bench/run', o.url), { headers: authHeaders(o.token) });
		} catch (e) {
			const wait = backoffDelayMs(attempt, o.baseDelayMs ?? 500, o.maxDelayMs ?? 30_000, o.random);
			log(`GET /api/v1/bench/run failed (${(e as Error).message}); retrying in ${Math.round(wait)} ms`);
			if (stop.aborted) throw e;
			await sleep(wait);
			continue;
		}
		if (res.ok) return (await res.json()) as BenchRunInfo;
		if (isRetryableStatus(res.status)) {
			const wait = parseRetryAfterMs(res.headers.get('retry-after')) ?? backoffDelayMs(attempt, o.baseDelayMs ?? 500, o.maxDelayMs ?? 30_000, o.random);
			await res.body?.cancel().catch(() => {});
			log(`GET /api/v1/bench/run: ${res.status}; retrying in ${Math.round(wait)} ms`);
			if (stop.aborted) throw new Error('stopped');
			await sleep(wait);
			continue;
		}
		const body = await raiseFatal(res, 'GET /api/v1/bench/run');
		throw new RunUnavailableError(res.status, body.code, `GET /api/v1/bench/run: ${res.status} ${body.code}: ${body.message}`);
	}
}

/** What both instrument clients hold: the unacknowledged readings, the run, the log, the fatal-error
 *  promise and the counters. */
export abstract class BaseIngestClient {
	protected readonly buffer: UnackedBuffer;
	protected runId: string | null;
	protected readonly log: (m: string) => void;
	protected fail!: (e: Error) => void;
	readonly failed: Promise<never>;
	protected readonly s: ClientStats = { sent: 0, acknowledged: 0, duplicates: 0, rejected: 0, retries: 0, reconnects: 0, highestDurableSeq: -1 };

	constructor(protected readonly o: ClientOptions) {
		this.buffer = new UnackedBuffer(o.bufferCapacity ?? 100_000);
		this.runId = o.runId ?? null;
		this.log = o.log ?? (() => {});
		this.failed = new Promise<never>((_, reject) => (this.fail = reject));
		this.failed.catch(() => {});
	}

	stats(): ClientStats {
		return { ...this.s };
	}
}
