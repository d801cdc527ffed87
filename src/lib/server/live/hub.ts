// The live hub: fans reduced readings and detector states out to browser subscribers.
//
// Nothing is sent from inside the ingest: a publish only appends to each subscriber's pending state
// and schedules one flush (setImmediate), so the writer's commit never waits for a socket. A flush
// sends at most MAX_SENDS_PER_FLUSH messages per subscriber and skips any whose socket buffer is
// above HIGH_WATER_BYTES; such a subscriber is congested until its buffer falls below LOW_WATER_BYTES
// (checked on a short timer). While congested its pending readings are decimated (every other one
// dropped whenever the cap is reached) and detector states coalesced (only the newest kept), so one
// slow browser costs bounded memory and never delays the others.

import type { AlertSummary, BenchSummary, DetectorState, LiveReading, LiveServerMessage } from '$lib/live/protocol';

export interface HubSocket {
	send(data: string): void;
	readonly bufferedAmount: number;
}

export const HIGH_WATER_BYTES = 512 * 1024;
export const LOW_WATER_BYTES = 128 * 1024;
export const MAX_SENDS_PER_FLUSH = 8;
/** readings kept per run for a subscriber that cannot keep up (decimated beyond this) */
export const PENDING_READINGS_CAP = 2000;
/**
 * readings kept for a subscriber that is keeping up, before it is decimated all the same: one reducer
 * update can carry several thousand readings (it coalesces commits when it falls behind), and a flowing
 * subscriber sends them on the next flush, so only a memory bound is needed here.
 */
export const FLOWING_PENDING_CAP = 50_000;
/** readings per message */
export const READINGS_PER_MESSAGE = 500;
const CONGESTION_CHECK_MS = 20;

interface HistoryCursor {
	/** produces the next chunk of history (reduced); null when done */
	next(max: number): LiveReading[] | null;
	skipped: number;
	throughSeq: number;
}

interface RunSubscription {
	runId: number;
	/** live readings at or below this seq were in the history already */
	afterSeq: number;
	history: HistoryCursor | null;
	pending: LiveReading[];
	skipped: number;
	detector: DetectorState | null;
	detectorDirty: boolean;
}

export class Subscriber {
	readonly runs = new Map<number, RunSubscription>();
	overview = false;
	readonly overviewDirty = new Map<number, BenchSummary>();
	congested = false;
	closed = false;
	/** messages this subscriber was sent / readings dropped for it (for tests and the benchmark) */
	sent = 0;
	decimated = 0;
	constructor(readonly socket: HubSocket) {}
}

export class LiveHub {
	private readonly byRun = new Map<number, Set<Subscriber>>();
	private readonly overview = new Set<Subscriber>();
	private readonly dirty = new Set<Subscriber>();
	private readonly congested = new Set<Subscriber>();
	private flushScheduled: NodeJS.Immediate | null = null;
	private congestionTimer: NodeJS.Timeout | null = null;

	/** Does anyone watch this run? (If not, the ingest need not build reading objects for it.) */
	watching(runId: number): boolean {
		return this.byRun.has(runId);
	}

	subscriberCount(): number {
		let n = this.overview.size;
		for (const s of this.byRun.values()) n += s.size;
		return n;
	}

	/** Subscribes to a run; history (from storage) is sent before anything live. */
	subscribeRun(sub: Subscriber, runId: number, history: HistoryCursor | null, detector: DetectorState | null): void {
		sub.runs.set(runId, { runId, afterSeq: history?.throughSeq ?? -1, history, pending: [], skipped: 0, detector, detectorDirty: history === null && detector !== null });
		let set = this.byRun.get(runId);
		if (!set) this.byRun.set(runId, (set = new Set()));
		set.add(sub);
		this.markDirty(sub);
	}

	unsubscribeRun(sub: Subscriber, runId: number): void {
		sub.runs.delete(runId);
		const set = this.byRun.get(runId);
		set?.delete(sub);
		if (set && set.size === 0) this.byRun.delete(runId);
	}

	subscribeOverview(sub: Subscriber, initial: BenchSummary[]): void {
		sub.overview = true;
		this.overview.add(sub);
		this.send(sub, { type: 'overview', benches: initial, full: true });
	}

	unsubscribeOverview(sub: Subscriber): void {
		sub.overview = false;
		sub.overviewDirty.clear();
		this.overview.delete(sub);
	}

	remove(sub: Subscriber): void {
		sub.closed = true;
		for (const runId of [...sub.runs.keys()]) this.unsubscribeRun(sub, runId);
		this.unsubscribeOverview(sub);
		this.dirty.delete(sub);
		this.congested.delete(sub);
	}

	publishRun(runId: number, readings: LiveReading[], detector: DetectorState | null): void {
		const set = this.byRun.get(runId);
		if (!set) return;
		for (const sub of set) {
			const rs = sub.runs.get(runId)!;
			for (const r of readings) if (r.seq > rs.afterSeq) rs.pending.push(r);
			if (rs.pending.length > (sub.congested ? PENDING_READINGS_CAP : FLOWING_PENDING_CAP)) this.decimate(sub, rs);
			rs.detector = detector;
			rs.detectorDirty = true;
			this.markDirty(sub);
		}
	}

	publishBench(summary: BenchSummary): void {
		if (this.overview.size === 0) return;
		const runId = Number(summary.runId);
		for (const sub of this.overview) {
			sub.overviewDirty.set(runId, summary);
			this.markDirty(sub);
		}
	}

	runEnded(runId: number, state: string): void {
		const set = this.byRun.get(runId);
		if (set) for (const sub of set) this.send(sub, { type: 'run-ended', runId: String(runId), state });
		for (const sub of this.overview) {
			sub.overviewDirty.delete(runId);
			this.send(sub, { type: 'run-ended', runId: String(runId), state });
		}
	}

	/** An alert changed: to every overview subscriber and to those following its run (rare, small, sent at once). */
	publishAlert(alert: AlertSummary): void {
		const message: LiveServerMessage = { type: 'alert', alert };
		const to = new Set<Subscriber>(this.overview);
		if (alert.runId !== null) for (const sub of this.byRun.get(Number(alert.runId)) ?? []) to.add(sub);
		for (const sub of to) this.send(sub, message);
	}

	/** Keeps every other pending reading (always the newest), so a chart still shows the shape. */
	private decimate(sub: Subscriber, rs: RunSubscription): void {
		const p = rs.pending;
		const kept: LiveReading[] = [];
		for (let i = p.length - 1; i >= 0; i -= 2) kept.push(p[i]);
		kept.reverse();
		const dropped = p.length - kept.length;
		rs.skipped += dropped;
		sub.decimated += dropped;
		rs.pending = kept;
	}

	private markDirty(sub: Subscriber): void {
		if (sub.closed) return;
		this.dirty.add(sub);
		if (!this.flushScheduled) this.flushScheduled = setImmediate(() => this.flush());
	}

	private send(sub: Subscriber, message: LiveServerMessage): void {
		if (sub.closed) return;
		try {
			sub.socket.send(JSON.stringify(message));
			sub.sent++;
		} catch {
			/* the socket is closing; its close handler removes the subscriber */
		}
	}

	flush(): void {
		this.flushScheduled = null;
		const subs = [...this.dirty];
		this.dirty.clear();
		for (const sub of subs) {
			// A congested subscriber waits for its buffer to drain (the congestion timer wakes it).
			if (sub.closed || sub.congested) continue;
			if (sub.socket.bufferedAmount > HIGH_WATER_BYTES) {
				this.setCongested(sub);
				continue;
			}
			if (!this.service(sub)) this.dirty.add(sub);
		}
		// Anything left over (send cap reached) goes on in the next turn of the event loop.
		if (this.dirty.size > 0 && !this.flushScheduled) this.flushScheduled = setImmediate(() => this.flush());
	}

	/** Sends what the subscriber has pending, within the caps; true when nothing is left. */
	private service(sub: Subscriber): boolean {
		let sends = 0;
		const room = () => sends < MAX_SENDS_PER_FLUSH && sub.socket.bufferedAmount <= HIGH_WATER_BYTES;
		for (const rs of sub.runs.values()) {
			const runId = String(rs.runId);
			while (rs.history && room()) {
				const chunk = rs.history.next(READINGS_PER_MESSAGE);
				if (chunk === null) {
					this.send(sub, { type: 'synced', runId, throughSeq: rs.history.throughSeq });
					rs.history = null;
					sends++;
					break;
				}
				this.send(sub, { type: 'readings', runId, source: 'history', readings: chunk, skipped: rs.history.skipped, detector: null });
				rs.history.skipped = 0;
				sends++;
			}
			if (rs.history) continue;
			while ((rs.pending.length > 0 || rs.detectorDirty) && room()) {
				// splice, not two slices: a flowing subscriber may hold tens of thousands (FLOWING_PENDING_CAP),
				// and copying the rest on every message made draining 50 000 cost ~13 ms against ~1 ms here
				// (V8 trims the front of the array in place).
				const readings = rs.pending.splice(0, READINGS_PER_MESSAGE);
				this.send(sub, { type: 'readings', runId, source: 'live', readings, skipped: rs.skipped, detector: rs.detector });
				rs.skipped = 0;
				rs.detectorDirty = false;
				sends++;
			}
		}
		if (sub.overviewDirty.size > 0 && room()) {
			this.send(sub, { type: 'overview', benches: [...sub.overviewDirty.values()], full: false });
			sub.overviewDirty.clear();
			sends++;
		}
		if (sub.socket.bufferedAmount > HIGH_WATER_BYTES) this.setCongested(sub);
		for (const rs of sub.runs.values()) if (rs.history || rs.pending.length > 0 || rs.detectorDirty) return false;
		return sub.overviewDirty.size === 0;
	}

	private setCongested(sub: Subscriber): void {
		if (!sub.congested) {
			sub.congested = true;
			this.congested.add(sub);
		}
		if (!this.congestionTimer) this.congestionTimer = setTimeout(() => this.checkCongested(), CONGESTION_CHECK_MS);
	}

	private checkCongested(): void {
		this.congestionTimer = null;
		for (const sub of this.congested) {
			if (sub.closed) {
				this.congested.delete(sub);
				continue;
			}
			if (sub.socket.bufferedAmount < LOW_WATER_BYTES) {
				sub.congested = false;
				this.congested.delete(sub);
				this.markDirty(sub);
			}
		}
		if (this.congested.size > 0) this.congestionTimer = setTimeout(() => this.checkCongested(), CONGESTION_CHECK_MS);
	}

	/** Stops the timers (shutdown, tests). */
	close(): void {
		if (this.flushScheduled) clearImmediate(this.flushScheduled);
		if (this.congestionTimer) clearTimeout(this.congestionTimer);
		this.flushScheduled = null;
		this.congestionTimer = null;
	}
}
