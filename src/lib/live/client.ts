// Browser client of the live stream /ws/v1/live (docs/live-protocol.md): one socket, any number of run
// subscriptions and the overview; reconnects with exponential backoff and jitter and, after a
// reconnect, resumes every run from the seq after the last one it delivered, so the caller sees no
// gap and no repeat. Plain TypeScript (no Svelte) so bench screens can wrap it in a runes class.

import type { AlertSummary, BenchSummary, DetectorState, LiveReading, LiveServerMessage, RunInfo } from './protocol';

export interface RunHandlers {
	/** Readings in seq order, from history first and then live; `skipped` counts readings left out. */
	onReadings(readings: LiveReading[], info: { source: 'history' | 'live'; skipped: number; detector: DetectorState | null }): void;
	onRun?(run: RunInfo): void;
	/** The history up to `throughSeq` has been delivered; what follows is live. */
	onSynced?(throughSeq: number): void;
	onEnded?(state: string): void;
	onError?(code: string, message: string): void;
}

export type ConnectionState = 'connecting' | 'open' | 'waiting' | 'closed';

export interface LiveClientOptions {
	/** ws(s)://host/ws/v1/live; by default from the page's own location */
	url?: string;
	baseDelayMs?: number;
	maxDelayMs?: number;
	onState?(state: ConnectionState, detail?: string): void;
	/** an alert was raised, noted or cleared (sent to overview subscribers and those following its run) */
	onAlert?(alert: AlertSummary): void;
	/** for tests */
	WebSocketImpl?: typeof WebSocket;
	random?: () => number;
}

interface RunEntry {
	handlers: RunHandlers;
	/** last seq delivered to the caller; -1 before any */
	lastSeq: number;
	/** the caller's own starting point, until something has been delivered */
	fromSeq?: number;
}

export class LiveClient {
	private ws: WebSocket | null = null;
	private readonly runs = new Map<string, RunEntry>();
	private overview: ((benches: BenchSummary[], full: boolean) => void) | null = null;
	private overviewEnded: ((runId: string, state: string) => void) | null = null;
	private attempt = 0;
	private timer: ReturnType<typeof setTimeout> | null = null;
	private stopped = false;
	state: ConnectionState = 'connecting';

	constructor(private readonly o: LiveClientOptions = {}) {
		this.connect();
	}

	/** Follow one run; `fromSeq` to start from a known point (default: the recent history). */
	subscribe(runId: string, handlers: RunHandlers, fromSeq?: number): () => void {
		this.runs.set(runId, { handlers, lastSeq: -1, fromSeq });
		this.sendSubscribe(runId);
		return () => {
			this.runs.delete(runId);
			this.send({ type: 'unsubscribe', runId });
		};
	}

	/** Follow every recording bench; `full` is true for the complete list (after each (re)connect).
	 *  `onRunEnded` (optional) hears when a bench's run stops recording. */
	subscribeOverview(onBenches: (benches: BenchSummary[], full: boolean) => void, onRunEnded?: (runId: string, state: string) => void): () => void {
		this.overview = onBenches;
		this.overviewEnded = onRunEnded ?? null;
		this.send({ type: 'subscribe-overview' });
		return () => {
			this.overview = null;
			this.overviewEnded = null;
			this.send({ type: 'unsubscribe-overview' });
		};
	}

	close(): void {
		this.stopped = true;
		if (this.timer) clearTimeout(this.timer);
		this.ws?.close(1000, 'page closed');
		this.setState('closed');
	}

	private url(): string {
		if (this.o.url) return this.o.url;
		const loc = globalThis.location;
		return `${loc.protocol === 'https:' ? 'wss:' : 'ws:'}//${loc.host}/ws/v1/live`;
	}

	private setState(s: ConnectionState, detail?: string): void {
		this.state = s;
		this.o.onState?.(s, detail);
	}

	private connect(): void {
		if (this.stopped) return;
		this.setState('connecting');
		const Impl = this.o.WebSocketImpl ?? WebSocket;
		const ws = new Impl(this.url());
		this.ws = ws;
		let opened = false;
		ws.onopen = () => {
			opened = true;
			this.attempt = 0;
			this.setState('open');
			for (const runId of this.runs.keys()) this.sendSubscribe(runId);
			if (this.overview) this.send({ type: 'subscribe-overview' });
		};
		ws.onmessage = (ev) => this.onMessage(JSON.parse(String(ev.data)) as LiveServerMessage);
		ws.onclose = (ev) => {
			this.ws = null;
			if (this.stopped) return;
			// 1008/4401: the session is gone (signed out elsewhere); a new page load will sign in again.
			const detail = opened ? `closed (${ev.code})` : 'could not connect';
			this.retry(detail);
		};
	}

	private retry(detail: string): void {
		const base = this.o.baseDelayMs ?? 500;
		const cap = Math.min(this.o.maxDelayMs ?? 30_000, base * 2 ** Math.min(this.attempt++, 16));
		const wait = cap / 2 + (this.o.random ?? Math.random)() * (cap / 2);
		this.setState('waiting', `${detail}; retrying in ${Math.round(wait / 100) / 10} s`);
		this.timer = setTimeout(() => this.connect(), wait);
	}

	private send(m: object): void {
		if (this.ws && this.ws.readyState === 1) this.ws.send(JSON.stringify(m));
	}

	private sendSubscribe(runId: string): void {
		const e = this.runs.get(runId);
		if (!e) return;
		const fromSeq = e.lastSeq >= 0 ? e.lastSeq + 1 : e.fromSeq;
		this.send(fromSeq === undefined ? { type: 'subscribe', runId } : { type: 'subscribe', runId, fromSeq });
	}

	private onMessage(m: LiveServerMessage): void {
		switch (m.type) {
			case 'readings': {
				const e = this.runs.get(m.runId);
				if (!e) return;
				// Never hand the caller a seq twice, whatever a reconnect races.
				const fresh = m.readings.filter((r) => r.seq > e.lastSeq);
				if (fresh.length > 0) e.lastSeq = fresh[fresh.length - 1].seq;
				if (fresh.length > 0 || m.detector) e.handlers.onReadings(fresh, { source: m.source, skipped: m.skipped, detector: m.detector });
				return;
			}
			case 'run':
				return this.runs.get(m.run.runId)?.handlers.onRun?.(m.run);
			case 'synced':
				return this.runs.get(m.runId)?.handlers.onSynced?.(m.throughSeq);
			case 'run-ended':
				if (this.overview) this.overviewEnded?.(m.runId, m.state);
				return this.runs.get(m.runId)?.handlers.onEnded?.(m.state);
			case 'overview':
				return this.overview?.(m.benches, m.full);
			case 'error':
				if (m.runId) this.runs.get(m.runId)?.handlers.onError?.(m.code, m.message);
				return;
			case 'alert':
				return this.o.onAlert?.(m.alert);
			case 'hello':
				return;
		}
	}
}
