// The readings endpoint served straight from node:http in the built server (server.js asks this
// first, then hands everything else to SvelteKit). It is the one hot path of the product: an
// instrument replaying a day of readings sends hundreds of batches a second, and SvelteKit's
// Request/Response conversion and hooks would cost about as much as storing the batch. The answer
// is the very same function the SvelteKit route calls (readingsAnswer), so both paths behave alike;
// the endpoint authenticates by bench token itself (access.ts lists it as 'bench-token').

import type { IncomingMessage, ServerResponse } from 'node:http';
import { readingsAnswer, type BodyRead, type IngestAnswer } from './http';
import { MAX_BODY_BYTES } from './limits';

/** Same shape as src/params/integer.ts: a positive id without leading zeros. */
const READINGS_PATH = /^\/api\/v1\/runs\/([1-9][0-9]{0,15})\/readings$/;

function header(req: IncomingMessage, name: string): string | null {
	const v = req.headers[name];
	return v === undefined ? null : Array.isArray(v) ? v.join(', ') : v;
}

/** Collects the body up to MAX_BODY_BYTES; past it, the rest is read and dropped (the connection stays usable). */
function readNodeBody(req: IncomingMessage): Promise<BodyRead> {
	return new Promise((resolve) => {
		const chunks: Buffer[] = [];
		let size = 0;
		let settled = false;
		const settle = (r: BodyRead) => {
			if (settled) return;
			settled = true;
			chunks.length = 0;
			resolve(r);
		};
		req.on('data', (chunk: Buffer) => {
			if (settled) return;
			size += chunk.length;
			if (size > MAX_BODY_BYTES) return settle({ ok: false, reason: 'too_large' });
			chunks.push(chunk);
		});
		req.on('end', () => {
			if (settled) return;
			const text = Buffer.concat(chunks, size).toString('utf8');
			settle({ ok: true, text });
		});
		req.on('error', () => settle({ ok: false, reason: 'unreadable' }));
		req.on('close', () => settle({ ok: false, reason: 'unreadable' }));
	});
}

function send(res: ServerResponse, a: IngestAnswer): void {
	if (res.headersSent || res.destroyed) return;
	const body = JSON.stringify(a.body);
	res.writeHead(a.status, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body), ...a.headers });
	res.end(body);
}

/** Serves the request if it is a POST of readings; false: not ours, let SvelteKit have it. */
export function serveReadingsDirect(req: IncomingMessage, res: ServerResponse): boolean {
	if (req.method !== 'POST' || !req.url) return false;
	const q = req.url.indexOf('?');
	const m = READINGS_PATH.exec(q < 0 ? req.url : req.url.slice(0, q));
	if (!m) return false;
	const head = { authorization: header(req, 'authorization'), contentType: header(req, 'content-type'), contentLength: header(req, 'content-length') };
	readingsAnswer(head, () => readNodeBody(req), m[1]).then(
		(a) => send(res, a),
		(e) => {
			console.error('ingest: readings request failed', e);
			send(res, { status: 500, body: { error: { code: 'internal_error', message: 'The server failed to handle the readings; retry shortly.' } } });
		}
	);
	return true;
}
