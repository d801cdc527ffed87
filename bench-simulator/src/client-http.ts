// HTTP instrument client: batched POST /api/v1/runs/{runId}/readings, one request in flight so the
// server sees seqs in order, retries with backoff + jitter on network errors, 5xx and 429
// (Retry-After honoured), never on another 4xx.

import {
	BaseIngestClient,
	authHeaders,
	backoffDelayMs,
	getBenchRun,
	isRetryableStatus,
	parseRetryAfterMs,
	raiseFatal,
	sleep,
	type ClientOptions,
	type IngestClient
} from './client-common';
import type { SimReading } from './types';

interface InvalidDetail {
	index?: number;
	seq?: number;
}

export class HttpIngestClient extends BaseIngestClient implements IngestClient {
	private batchSize: number;
	private closing = false;
	private stopped = { aborted: false };
	private downUntilMs = 0;
	private needResync = false;
	private wake: (() => void) | null = null;
	private pumpDone: Promise<void> | null = null;

	constructor(o: ClientOptions) {
		super(o);
		this.batchSize = Math.min(o.batchSize ?? 500, 5000);
	}

	async start(): Promise<{ runId: string; highestDurableSeq: number }> {
		const info = await getBenchRun(this.o, this.stopped).catch((e: Error) => {
			// with an explicit run id a missing "current run" is not fatal: the POSTs will tell
			if (this.runId && e.name === 'RunUnavailableError') return null;
			throw e;
		});
		if (!this.runId && info) this.runId = info.runId;
		if (info && info.runId === this.runId) this.s.highestDurableSeq = info.highestDurableSeq;
		this.pumpDone = this.pump().catch((e: Error) => this.fail(e));
		return { runId: this.runId!, highestDurableSeq: this.s.highestDurableSeq };
	}

	async enqueue(r: SimReading): Promise<void> {
		await this.buffer.push(r);
		if (this.buffer.length >= this.batchSize) this.kick();
	}

	disconnectFor(ms: number): void {
		this.downUntilMs = Date.now() + ms;
		this.needResync = true;
		this.log(`link down for ${ms} ms (simulated)`);
	}

	async finish(timeoutMs = 60_000): Promise<void> {
		this.closing = true;
		this.kick();
		const until = Date.now() + timeoutMs;
		while (this.buffer.length > 0 && Date.now() < until && !this.stopped.aborted) {
			await Promise.race([sleep(20), this.failed]);
		}
		if (this.buffer.length > 0) throw new Error(`${this.buffer.length} readings still unacknowledged after ${timeoutMs} ms`);
	}

	async close(): Promise<void> {
		this.closing = true;
		this.stopped.aborted = true;
		this.kick();
		await this.pumpDone;
	}

	private kick() {
		this.wake?.();
	}

	private async waitForWork(): Promise<void> {
		if (this.buffer.length >= this.batchSize || (this.closing && this.buffer.length > 0)) return;
		await new Promise<void>((resolve) => {
			const t = setTimeout(resolve, this.o.flushIntervalMs ?? 1000);
			this.wake = () => {
				clearTimeout(t);
				resolve();
			};
		});
		this.wake = null;
	}

	private async pump(): Promise<void> {
		while (!this.stopped.aborted) {
			await this.waitForWork();
			if (this.stopped.aborted) break;
			if (this.buffer.length === 0) continue;
			const batch = this.buffer.items.slice(0, this.batchSize);
			const done = await this.send(batch);
			const gone = new Set(done);
			this.buffer.remove((r) => gone.has(r));
		}
	}

	/** Sends one batch until it is stored or refused; returns the readings that are done with. */
	private async send(original: SimReading[]): Promise<SimReading[]> {
		let batch = original;
		const base = this.o.baseDelayMs ?? 500;
		const max = this.o.maxDelayMs ?? 30_000;
		for (let attempt = 0; !this.stopped.aborted; ) {
			const downMs = this.downUntilMs - Date.now();
			if (downMs > 0) await sleep(downMs);
			if (this.needResync) {
				// after a broken link: ask what the server holds, resend only the rest
				const info = await getBenchRun({ ...this.o, log: this.log }, this.stopped);
				this.needResync = false;
				this.s.reconnects++;
				if (info.runId === this.runId) {
					this.s.highestDurableSeq = Math.max(this.s.highestDurableSeq, info.highestDurableSeq);
					batch = batch.filter((r) => r.seq > info.highestDurableSeq);
					this.log(`resuming after seq ${info.highestDurableSeq}`);
				}
				if (batch.length === 0) return original;
			}
			let res: Response;
			try {
				res = await fetch(new URL(`/api/v1/runs/${encodeURIComponent(this.runId!)}/readings`, this.o.url), {
					method: 'POST',
					headers: { ...authHeaders(this.o.token), 'content-type': 'application/json' },
					body: JSON.stringify({ readings: batch })
				});
			} catch (e) {
				const wait = backoffDelayMs(attempt++, base, max, this.o.random);
				this.s.retries++;
				this.needResync = true;
				this.log(`POST failed (${(e as Error).message}); retrying in ${Math.round(wait)} ms`);
				await sleep(wait, this.stopped);
				continue;
			}
			this.s.sent += batch.length;
			if (res.ok) {
				const body = (await res.json()) as { accepted: number; duplicates: number; highestDurableSeq: number };
				this.s.acknowledged += body.accepted;
				this.s.duplicates += body.duplicates;
				this.s.highestDurableSeq = Math.max(this.s.highestDurableSeq, body.highestDurableSeq);
				return original;
			}
			if (isRetryableStatus(res.status)) {
				const wait = parseRetryAfterMs(res.headers.get('retry-after')) ?? backoffDelayMs(attempt, base, max, this.o.random);
				attempt++;
				this.s.retries++;
				await res.body?.cancel().catch(() => {});
				this.log(`POST: ${res.status}; retrying in ${Math.round(wait)} ms`);
				await sleep(wait, this.stopped);
				continue;
			}
			const err = await raiseFatal(res, `POST readings for run ${this.runId}`);
			if (res.status === 413 && batch.length > 1) {
				this.batchSize = Math.max(1, Math.floor(batch.length / 2));
				this.log(`413: batch of ${batch.length} too large; sending ${this.batchSize} at a time`);
				return [];
			}
			if (res.status === 422 && Array.isArray(err.details) && err.details.length > 0) {
				// the whole batch was refused for some readings: drop those, send the others as a new batch
				const badIdx = new Set((err.details as InvalidDetail[]).map((x) => x.index).filter((i): i is number => typeof i === 'number'));
				const kept = batch.filter((_, i) => !badIdx.has(i));
				this.s.rejected += batch.length - kept.length;
				this.log(`422 ${err.code}: dropped ${batch.length - kept.length} invalid reading(s): ${err.message}`);
				if (kept.length === batch.length || kept.length === 0) {
					if (kept.length) this.s.rejected += kept.length;
					return original;
				}
				batch = kept;
				attempt = 0;
				continue;
			}
			this.s.rejected += batch.length;
			this.log(`${res.status} ${err.code}: batch of ${batch.length} dropped (not retried): ${err.message}`);
			return original;
		}
		return [];
	}
}
