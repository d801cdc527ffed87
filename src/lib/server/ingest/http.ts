// The two HTTP endpoints of the instrument protocol (docs/ingest-protocol.md), independent of the HTTP
// layer that carries them: each returns an IngestAnswer (status, JSON body, headers). SvelteKit's routes
// turn it into a Response (toResponse); in the built server, the readings endpoint is also served
// straight from node:http (direct.ts), skipping the Request/Response conversion on the hot path.

import { json } from '@sveltejs/kit';
import { apiErrorBody } from '../http/api-error';
import { authenticateToken, authorizeRun, bearerToken, recordingRunOfBench, type TokenIdentity } from './auth';
import { MAX_BODY_BYTES, WRITER_QUEUE_MAX_ROWS } from './limits';
import { ingestService } from './service';
import { parseBatchBody } from './validate';

export interface ReadingsResponse {
	accepted: number;
	duplicates: number;
	highestDurableSeq: number;
	/** readings stored whose timeMs is earlier than one the run already had (see the protocol) */
	timeBackwards: number;
}

export interface IngestAnswer {
	status: number;
	body: unknown;
	headers?: Record<string, string>;
}

/** The request line and headers an endpoint looks at. */
export interface IngestRequestHead {
	authorization: string | null;
	contentType: string | null;
	contentLength: string | null;
}

/** A request body as read by the HTTP layer, which stops reading at MAX_BODY_BYTES. */
export type BodyRead = { ok: true; text: string } | { ok: false; reason: 'too_large' | 'unreadable' };

function refusal(status: number, code: string, message: string, details?: unknown, headers?: Record<string, string>): IngestAnswer {
	return { status, body: apiErrorBody(code, message, details), headers };
}

export function toResponse(a: IngestAnswer): Response {
	return json(a.body, { status: a.status, headers: a.headers });
}

function authenticate(head: IngestRequestHead): { ok: true; identity: TokenIdentity } | { ok: false; answer: IngestAnswer } {
	const svc = ingestService();
	const auth = authenticateToken(svc.sqlite, bearerToken(head.authorization));
	if (!auth.ok) return { ok: false, answer: refusal(auth.status, auth.code, auth.message) };
	const rate = svc.limiter.take(`token:${auth.identity.tokenId}`);
	if (!rate.allowed) {
		return { ok: false, answer: refusal(429, 'rate_limited', `Too many requests for this token; retry after ${rate.retryAfterS} s.`, undefined, { 'retry-after': String(rate.retryAfterS) }) };
	}
	return auth;
}

export function benchRunAnswer(head: IngestRequestHead): IngestAnswer {
	const auth = authenticate(head);
	if (!auth.ok) return auth.answer;
	const run = recordingRunOfBench(ingestService().sqlite, auth.identity.benchId);
	if (!run) return refusal(404, 'no_active_run', 'This bench has no run in the recording state.');
	return { status: 200, body: { benchId: String(run.benchId), runId: String(run.id), state: run.state, highestDurableSeq: run.highestSeq } };
}

function bodyFormat(contentType: string | null): 'json' | 'ndjson' | null {
	const type = (contentType ?? '').split(';')[0].trim().toLowerCase();
	if (type === 'application/json') return 'json';
	if (type === 'application/x-ndjson' || type === 'application/ndjson') return 'ndjson';
	return null;
}

const TOO_LARGE = `The body exceeds ${MAX_BODY_BYTES} bytes; send fewer readings per request.`;

export async function readingsAnswer(head: IngestRequestHead, readBody: () => Promise<BodyRead>, runIdParam: string): Promise<IngestAnswer> {
	const auth = authenticate(head);
	if (!auth.ok) return auth.answer;
	const svc = ingestService();
	const target = authorizeRun(svc.sqlite, auth.identity, Number(runIdParam));
	if (!target.ok) return refusal(target.status, target.code, target.message);
	const format = bodyFormat(head.contentType);
	if (!format) return refusal(415, 'unsupported_media_type', 'Send Content-Type: application/json or application/x-ndjson.');
	if (svc.writer.pendingRows > WRITER_QUEUE_MAX_ROWS) return refusal(503, 'busy', 'The server is catching up with its writes; retry shortly.', undefined, { 'retry-after': '1' });
	const declared = Number(head.contentLength);
	if (Number.isFinite(declared) && declared > MAX_BODY_BYTES) return refusal(413, 'payload_too_large', TOO_LARGE);
	const body = await readBody();
	if (!body.ok) return body.reason === 'too_large' ? refusal(413, 'payload_too_large', TOO_LARGE) : refusal(400, 'unreadable_body', 'The request body could not be read.');
	const batch = parseBatchBody(body.text, format);
	if (!batch.ok) return refusal(batch.status, batch.code, batch.message, batch.details);
	svc.runs.prepare(target.run.id);
	const result = await svc.writer.write(target.run.id, auth.identity.tokenId, batch.readings);
	if (!result.ok) {
		if (result.code === 'run_not_recording') return refusal(403, result.code, result.message);
		if (result.code === 'run_not_found') return refusal(404, 'not_found', result.message);
		return refusal(503, result.code, result.message, undefined, { 'retry-after': '1' });
	}
	return { status: 200, body: { accepted: result.accepted, duplicates: result.duplicates, highestDurableSeq: result.highestDurableSeq, timeBackwards: result.timeBackwards } satisfies ReadingsResponse };
}

// ---------------------------------------------------------------- SvelteKit (dev server, fallback)

export function headOf(request: Request): IngestRequestHead {
	return { authorization: request.headers.get('authorization'), contentType: request.headers.get('content-type'), contentLength: request.headers.get('content-length') };
}

/** Reads a web Request's body with our own cap, so every 413 has the API's error shape. */
async function readWebBody(request: Request): Promise<BodyRead> {
	if (!request.body) return { ok: true, text: '' };
	const reader = request.body.getReader();
	const chunks: Uint8Array[] = [];
	let size = 0;
	try {
		for (;;) {
			const { done, value } = await reader.read();
			if (done) break;
			size += value.byteLength;
			if (size > MAX_BODY_BYTES) {
				await reader.cancel().catch(() => {});
				return { ok: false, reason: 'too_large' };
			}
			chunks.push(value);
		}
	} catch (e) {
		// adapter-node's own BODY_SIZE_LIMIT surfaces here as an error with status 413.
		return { ok: false, reason: (e as { status?: number }).status === 413 ? 'too_large' : 'unreadable' };
	}
	return { ok: true, text: Buffer.concat(chunks).toString('utf8') };
}

export async function postReadings(request: Request, runIdParam: string): Promise<Response> {
	return toResponse(await readingsAnswer(headOf(request), () => readWebBody(request), runIdParam));
}

export function getBenchRun(request: Request): Response {
	return toResponse(benchRunAnswer(headOf(request)));
}
