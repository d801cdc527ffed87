// One browser's live stream (/ws/v1/live, docs/live-protocol.md). The session was checked at the
// upgrade; any signed-in role may watch (the bench screens are open to every role).

import type { WebSocket } from 'ws';
import type { LiveClientMessage, LiveReading, LiveServerMessage, RunInfo } from '$lib/live/protocol';
import type { SessionUser } from '../auth/types';
import type { IngestService } from '../ingest/service';
import { loadReductionContext, reduceForLive, type ReductionContext } from '../ingest/reduce';
import { Subscriber } from './hub';

/** At most this many readings of history are sent on (re)subscribing; older ones are counted as skipped. */
export const HISTORY_LIMIT = 20_000;
const MAX_RUN_SUBSCRIPTIONS = 64;

interface RawRow {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel: number;
}

/** History from storage, read at subscription time and reduced chunk by chunk as it is sent. */
function historyCursor(svc: IngestService, ctx: ReductionContext, fromSeq: number | undefined) {
	const runId = ctx.runId;
	let rows: RawRow[];
	let skipped = 0;
	const cols = 'seq, time_ms as timeMs, ratio, current_ma as currentMilliAmp, channel';
	if (fromSeq === undefined) {
		rows = (svc.sqlite.prepare(`select ${cols} from reading where run_id = ? order by seq desc limit ?`).all(runId, HISTORY_LIMIT) as RawRow[]).reverse();
		if (rows.length === HISTORY_LIMIT) skipped = (svc.sqlite.prepare('select count(*) as n from reading where run_id = ? and seq < ?').get(runId, rows[0].seq) as { n: number }).n;
	} else {
		rows = (svc.sqlite.prepare(`select ${cols} from reading where run_id = ? and seq >= ? order by seq desc limit ?`).all(runId, fromSeq, HISTORY_LIMIT) as RawRow[]).reverse();
		if (rows.length === HISTORY_LIMIT) skipped = (svc.sqlite.prepare('select count(*) as n from reading where run_id = ? and seq >= ? and seq < ?').get(runId, fromSeq, rows[0].seq) as { n: number }).n;
	}
	const highest = svc.sqlite.prepare('select highest_seq from run where id = ?').get(runId) as { highest_seq: number } | undefined;
	let pos = 0;
	let maxTimeMs = -Infinity;
	return {
		skipped,
		throughSeq: Math.max(highest?.highest_seq ?? -1, rows.length ? rows[rows.length - 1].seq : -1),
		next(max: number): LiveReading[] | null {
			if (pos >= rows.length) return null;
			const end = Math.min(rows.length, pos + max);
			const out: LiveReading[] = [];
			for (; pos < end; pos++) {
				const r = rows[pos];
				const backwards = r.timeMs < maxTimeMs;
				if (!backwards) maxTimeMs = r.timeMs;
				out.push(reduceForLive(ctx, r, backwards));
			}
			return out;
		}
	};
}

export function runInfo(ctx: ReductionContext, highestDurableSeq: number, readingCount: number): RunInfo {
	return {
		runId: String(ctx.runId),
		benchId: String(ctx.benchId),
		benchName: ctx.benchName,
		fixedPoint: ctx.fixedPoint,
		kind: ctx.kind,
		state: ctx.state,
		reduction: ctx.basis,
		reductionProblem: ctx.problem,
		expectedKelvin: ctx.expectedKelvin,
		highestDurableSeq,
		readingCount
	};
}

export function acceptLiveSocket(svc: IngestService, ws: WebSocket, user: SessionUser): void {
	const sub = new Subscriber(ws);
	const send = (m: LiveServerMessage) => {
		if (ws.readyState === ws.OPEN) ws.send(JSON.stringify(m));
	};
	const fail = (code: string, message: string, runId?: string) => send({ type: 'error', code, message, ...(runId ? { runId } : {}) });
	send({ type: 'hello', user: { name: user.name, role: user.role }, serverTimeMs: Date.now(), limits: { historyReadings: HISTORY_LIMIT } });

	const subscribe = (runIdText: unknown, fromSeq: unknown) => {
		const runId = typeof runIdText === 'string' || typeof runIdText === 'number' ? Number(runIdText) : NaN;
		if (!Number.isSafeInteger(runId) || runId <= 0) return fail('invalid_message', 'runId must be a run id.');
		if (fromSeq !== undefined && (typeof fromSeq !== 'number' || !Number.isSafeInteger(fromSeq) || fromSeq < 0)) return fail('invalid_message', 'fromSeq must be an integer ≥ 0.', String(runId));
		if (!sub.runs.has(runId) && sub.runs.size >= MAX_RUN_SUBSCRIPTIONS) return fail('too_many_subscriptions', `At most ${MAX_RUN_SUBSCRIPTIONS} runs per connection.`, String(runId));
		svc.hub.unsubscribeRun(sub, runId);
		const ctx = loadReductionContext(svc.sqlite, runId);
		if (!ctx) return fail('not_found', `Run ${runId} does not exist.`, String(runId));
		const counts = svc.sqlite.prepare('select highest_seq, reading_count from run where id = ?').get(runId) as { highest_seq: number; reading_count: number };
		send({ type: 'run', run: runInfo(ctx, counts.highest_seq, counts.reading_count) });
		// Read history and join the live stream in the same turn of the event loop: every commit is
		// either in what was read or published after this point. The reducer may still be behind and
		// publish readings the history already held; the hub drops those (seq ≤ throughSeq).
		svc.hub.subscribeRun(sub, runId, historyCursor(svc, ctx, fromSeq as number | undefined), svc.runs.detector(runId));
	};

	ws.on('message', (data) => {
		let m: LiveClientMessage;
		try {
			m = JSON.parse(data.toString()) as LiveClientMessage;
		} catch {
			return fail('invalid_message', 'Messages must be JSON.');
		}
		switch (m?.type) {
			case 'subscribe':
				return subscribe(m.runId, m.fromSeq);
			case 'unsubscribe':
				return svc.hub.unsubscribeRun(sub, Number(m.runId));
			case 'subscribe-overview':
				return svc.hub.subscribeOverview(sub, svc.runs.overview());
			case 'unsubscribe-overview':
				return svc.hub.unsubscribeOverview(sub);
			default:
				return fail('invalid_message', 'Unknown message type.');
		}
	});
	ws.on('close', () => svc.hub.remove(sub));
}
