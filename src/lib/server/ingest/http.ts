// The two HTTP endpoints of the instrument protocol (docs/ingest-protocol.md), as plain functions of a
// Request so the routes stay thin.

import { json } from '@sveltejs/kit';
import { apiError } from '../http/api-error';
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

function authenticate(request: Request): { ok: true; identity: TokenIdentity } | { ok: false; response: Response } {
	const svc = ingestService();
	const auth = authenticateToken(svc.sqlite, bearerToken(request.headers.get('authorization')));
	if (!auth.ok) return { ok: false, response: apiError(auth.status, auth.code, auth.message) };
	const rate = svc.limiter.take(`token:${auth.identity.tokenId}`);
	if (!rate.allowed) {
		return { ok: false, response: apiError(429, 'rate_limited', `Too many requests for this token; retry after ${rate.retryAfterS} s.`, undefined, { 'retry-after': String(rate.retryAfterS) }) };
	}
	return auth;
}

export function getBenchRun(request: Request): Response {
	const auth = authenticate(request);
	if (!auth.ok) return auth.response;
	const run = recordingRunOfBench(ingestService().sqlite, auth.identity.benchId);
	if (!run) return apiError(404, 'no_active_run', 'This bench has no run in the recording state.');
	return json({ benchId: String(run.benchId), runId: String(run.id), state: run.state, highestDurableSeq: run.highestSeq });
}

/** Reads the body with our own cap, so every 413 has the API's error shape. */
async function readBody(request: Request): Promise<{ ok: true; text: string } | { ok: false; response: Response }> {
	const tooLarge = () => ({ ok: false as const, response: apiError(413, 'payload_too_large', `The body exceeds ${MAX_BODY_BYTES} bytes; send fewer readings per request.`) });
	const declared = Number(request.headers.get('content-length'));
	if (Number.isFinite(declared) && declared > MAX_BODY_BYTES) return tooLarge();
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
				return tooLarge();
			}
			chunks.push(value);
		}
	} catch (e) {
		// adapter-node's own BODY_SIZE_LIMIT surfaces here as an error with status 413.
		if ((e as { status?: number }).status === 413) return tooLarge();
		return { ok: false, response: apiError(400, 'unreadable_body', 'The request body could not be read.') };
	}
	return { ok: true, text: Buffer.concat(chunks).toString('utf8') };
}

function bodyFormat(contentType: string | null): 'json' | 'ndjson' | null {
	const type = (contentType ?? '').split(';')[0].trim().toLowerCase();
	if (type === 'application/json') return 'json';
	if (type === 'application/x-ndjson' || type === 'application/ndjson') return 'ndjson';
	return null;
}

export async function postReadings(request: Request, runIdParam: string): Promise<Response> {
	const auth = authenticate(request);
	if (!auth.ok) return auth.response;
	const svc = ingestService();
	const target = authorizeRun(svc.sqlite, auth.identity, Number(runIdParam));
	if (!target.ok) return apiError(target.status, target.code, target.message);
	const format = bodyFormat(request.headers.get('content-type'));
	if (!format) return apiError(415, 'unsupported_media_type', 'Send Content-Type: application/json or application/x-ndjson.');
	if (svc.writer.pendingRows > WRITER_QUEUE_MAX_ROWS) return apiError(503, 'busy', 'The server is catching up with its writes; retry shortly.', undefined, { 'retry-after': '1' });
	const body = await readBody(request);
	if (!body.ok) return body.response;
	const batch = parseBatchBody(body.text, format);
	if (!batch.ok) return apiError(batch.status, batch.code, batch.message, batch.details);
	// Made before the commit so that its view of the stored readings does not include this batch.
	svc.runs.prepare(target.run.id);
	const result = await svc.writer.write(target.run.id, auth.identity.tokenId, batch.readings);
	if (!result.ok) {
		if (result.code === 'run_not_recording') return apiError(403, result.code, result.message);
		if (result.code === 'run_not_found') return apiError(404, 'not_found', result.message);
		return apiError(503, result.code, result.message, undefined, { 'retry-after': '1' });
	}
	let timeBackwards = 0;
	for (const r of result.stored) if (r.timeBackwards) timeBackwards++;
	return json({ accepted: result.accepted, duplicates: result.duplicates, highestDurableSeq: result.highestDurableSeq, timeBackwards } satisfies ReadingsResponse);
}
