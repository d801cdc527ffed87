// One instrument's WebSocket stream (/ws/v1/ingest): reading frames in, acks after each group commit.
// The token and run were checked during the upgrade; the writer re-checks the run state at commit.

import type { WebSocket } from 'ws';
import { tokenStillValid, type RunTarget, type TokenIdentity } from './auth';
import { WS_MAX_IN_FLIGHT } from './limits';
import type { IngestConnection, IngestService } from './service';
import { checkReading, type FieldError, type ValidReading } from './validate';

/** A client sending only garbage is cut off after this many unusable frames in a row. */
const MAX_BAD_FRAMES_IN_A_ROW = 100;
/** Readings in one `readings` frame (beyond this the frame is refused). */
const MAX_READINGS_PER_FRAME = 5000;

export function acceptIngestSocket(svc: IngestService, ws: WebSocket, identity: TokenIdentity, run: RunTarget, heartbeat: { recheckToken: () => boolean }): void {
	let inFlight = 0;
	let paused = false;
	let closed = false;
	let badFrames = 0;
	let highestAcked = run.highestSeq;
	const send = (message: unknown) => {
		if (!closed && ws.readyState === ws.OPEN) ws.send(JSON.stringify(message));
	};
	const conn: IngestConnection = {
		tokenId: identity.tokenId,
		runId: run.id,
		close(code, errorCode, message) {
			if (closed) return;
			send({ type: 'error', code: errorCode, message });
			closed = true;
			ws.close(code, message.slice(0, 120));
		}
	};
	svc.connections.add(conn);
	heartbeat.recheckToken = () => {
		if (tokenStillValid(svc.sqlite, identity.tokenId)) return true;
		conn.close(4401, 'invalid_token', 'This bench token has been revoked.');
		return false;
	};
	svc.runs.prepare(run.id);
	send({ type: 'hello', runId: String(run.id), highestDurableSeq: run.highestSeq });

	const submit = (readings: ValidReading[]) => {
		inFlight += readings.length;
		if (inFlight > WS_MAX_IN_FLIGHT && !paused) {
			// Stop reading the socket until the writer catches up: TCP pushes back on the client.
			paused = true;
			ws.pause();
		}
		svc.writer.submit({
			runId: run.id,
			tokenId: identity.tokenId,
			readings,
			done: (result) => {
				inFlight -= readings.length;
				if (paused && inFlight < WS_MAX_IN_FLIGHT / 2) {
					paused = false;
					ws.resume();
				}
				if (!result.ok) {
					if (result.code === 'run_not_recording' || result.code === 'run_not_found') conn.close(4403, 'run_not_recording', result.message);
					else if (result.code === 'shutting_down') conn.close(1012, result.code, result.message);
					else send({ type: 'error', code: result.code, message: result.message });
					return;
				}
				// One ack per commit: the writer answers all submissions of a group in one go, so the
				// ack goes out once the current microtasks are done.
				if (result.highestDurableSeq > highestAcked || result.accepted + result.duplicates > 0) scheduleAck(result.highestDurableSeq);
			}
		});
	};
	let ackSeq = -1;
	let ackScheduled = false;
	const scheduleAck = (seq: number) => {
		ackSeq = Math.max(ackSeq, seq);
		if (ackScheduled) return;
		ackScheduled = true;
		queueMicrotask(() => {
			ackScheduled = false;
			highestAcked = Math.max(highestAcked, ackSeq);
			send({ type: 'ack', highestDurableSeq: ackSeq });
		});
	};

	const refuse = (seq: unknown, errors: FieldError[]) => {
		send({ type: 'rejected', seq: typeof seq === 'number' ? seq : null, errors });
	};

	ws.on('message', (data, isBinary) => {
		if (closed) return;
		let frame: unknown;
		try {
			frame = JSON.parse(isBinary ? Buffer.from(data as Buffer).toString('utf8') : data.toString());
		} catch {
			frame = undefined;
		}
		const f = frame as { type?: unknown; readings?: unknown; seq?: unknown } | undefined;
		if (!f || typeof f !== 'object' || (f.type !== 'reading' && f.type !== 'readings')) {
			if (++badFrames > MAX_BAD_FRAMES_IN_A_ROW) return conn.close(1008, 'invalid_message', 'Too many unusable frames.');
			return refuse(null, [{ field: '(frame)', value: null, reason: 'expected JSON {"type":"reading",…} or {"type":"readings","readings":[…]}' }]);
		}
		const items = f.type === 'reading' ? [f] : Array.isArray(f.readings) ? f.readings : null;
		if (!items || items.length > MAX_READINGS_PER_FRAME) {
			if (++badFrames > MAX_BAD_FRAMES_IN_A_ROW) return conn.close(1008, 'invalid_message', 'Too many unusable frames.');
			return refuse(null, [{ field: 'readings', value: null, reason: `must be an array of at most ${MAX_READINGS_PER_FRAME} readings` }]);
		}
		badFrames = 0;
		const good: ValidReading[] = [];
		const errors: FieldError[] = [];
		for (const item of items) {
			errors.length = 0;
			const r = checkReading(item, errors);
			if (r) good.push(r);
			else refuse((item as { seq?: unknown } | null)?.seq, errors.slice());
		}
		if (good.length > 0) submit(good);
	});
	ws.on('close', () => {
		closed = true;
		svc.connections.delete(conn);
	});
}
