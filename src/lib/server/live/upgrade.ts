// WebSocket upgrades for the app's own paths, on the app's own HTTP server (ws with noServer: true).
// Production: server.js calls globalThis[Symbol.for('stillpoint.upgrade')]; dev and preview: the Vite
// plugin in vite.config.ts. Authentication happens before the upgrade, so a refused client gets a
// plain HTTP status (401/403/404) and never a WebSocket.

import type { IncomingMessage } from 'node:http';
import type { Duplex } from 'node:stream';
import { WebSocketServer, type WebSocket } from 'ws';
import { appDatabase } from '../db';
import { appAuth } from '../auth';
import { toSessionUser } from '../auth/session';
import { authenticateToken, authorizeRun, bearerToken } from '../ingest/auth';
import { PING_INTERVAL_MS, PONG_TIMEOUT_MS, WS_MAX_PAYLOAD_BYTES } from '../ingest/limits';
import { ingestService } from '../ingest/service';
import { acceptIngestSocket } from '../ingest/socket';
import { serveReadingsDirect } from '../ingest/direct';
import { acceptLiveSocket } from './socket';

const UPGRADE_KEY = Symbol.for('stillpoint.upgrade');
const SHUTDOWN_KEY = Symbol.for('stillpoint.shutdown');
const DIRECT_KEY = Symbol.for('stillpoint.direct');
const SOCKETS_KEY = Symbol.for('stillpoint.sockets');
/** Browsers only send small subscription messages. */
const LIVE_MAX_PAYLOAD_BYTES = 16 * 1024;

interface Beat {
	lastPongMs: number;
	recheckToken: () => boolean;
}

interface Sockets {
	ingest: WebSocketServer;
	live: WebSocketServer;
	beats: Map<WebSocket, Beat>;
	timer: NodeJS.Timeout;
}

const STATUS_TEXT: Record<number, string> = { 400: 'Bad Request', 401: 'Unauthorized', 403: 'Forbidden', 404: 'Not Found', 503: 'Service Unavailable' };

/** Answers the upgrade request with a plain HTTP error in the API's error shape, then closes. */
function refuse(socket: Duplex, status: number, code: string, message: string): void {
	const body = JSON.stringify({ error: { code, message } });
	socket.end(
		`HTTP/1.1 ${status} ${STATUS_TEXT[status] ?? 'Error'}\r\nContent-Type: application/json\r\nContent-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`
	);
}

function sockets(): Sockets {
	const g = globalThis as typeof globalThis & { [SOCKETS_KEY]?: Sockets };
	if (g[SOCKETS_KEY]) return g[SOCKETS_KEY]!;
	const beats = new Map<WebSocket, Beat>();
	// Heartbeat: ping everyone; a connection silent past the pong timeout is closed (4408) and cut.
	const timer = setInterval(() => {
		const nowMs = Date.now();
		for (const [ws, beat] of beats) {
			if (nowMs - beat.lastPongMs > PONG_TIMEOUT_MS) {
				beats.delete(ws);
				ws.close(4408, 'missed heartbeat');
				setTimeout(() => ws.terminate(), 1000).unref();
				continue;
			}
			if (!beat.recheckToken()) continue;
			ws.ping();
		}
	}, Math.min(PING_INTERVAL_MS, PONG_TIMEOUT_MS / 2));
	timer.unref();
	const s: Sockets = {
		ingest: new WebSocketServer({ noServer: true, maxPayload: WS_MAX_PAYLOAD_BYTES, perMessageDeflate: false }),
		live: new WebSocketServer({ noServer: true, maxPayload: LIVE_MAX_PAYLOAD_BYTES, perMessageDeflate: false }),
		beats,
		timer
	};
	g[SOCKETS_KEY] = s;
	return s;
}

function track(s: Sockets, ws: WebSocket): Beat {
	const beat: Beat = { lastPongMs: Date.now(), recheckToken: () => true };
	s.beats.set(ws, beat);
	ws.on('pong', () => (beat.lastPongMs = Date.now()));
	ws.on('close', () => s.beats.delete(ws));
	// A protocol error (e.g. a frame beyond maxPayload: ws closes with 1009) must not crash the process.
	ws.on('error', () => {});
	return beat;
}

function headersOf(req: IncomingMessage): Headers {
	const h = new Headers();
	for (const [k, v] of Object.entries(req.headers)) {
		if (Array.isArray(v)) for (const x of v) h.append(k, x);
		else if (v !== undefined) h.set(k, v);
	}
	return h;
}

export async function handleUpgrade(req: IncomingMessage, socket: Duplex, head: Buffer): Promise<void> {
	socket.on('error', () => socket.destroy());
	try {
		await appDatabase().ready;
		const url = new URL(req.url ?? '/', 'http://localhost');
		const s = sockets();
		const svc = ingestService();
		if (url.pathname === '/ws/v1/ingest') {
			const auth = authenticateToken(svc.sqlite, bearerToken(req.headers.authorization));
			if (!auth.ok) return refuse(socket, auth.status, auth.code, auth.message);
			const runId = Number(url.searchParams.get('runId'));
			if (!Number.isSafeInteger(runId) || runId <= 0) return refuse(socket, 404, 'not_found', 'Give the run as ?runId=<id>.');
			const target = authorizeRun(svc.sqlite, auth.identity, runId);
			if (!target.ok) return refuse(socket, target.status, target.code, target.message);
			s.ingest.handleUpgrade(req, socket, head, (ws) => acceptIngestSocket(svc, ws, auth.identity, target.run, track(s, ws)));
			return;
		}
		if (url.pathname === '/ws/v1/live') {
			const session = await appAuth().api.getSession({ headers: headersOf(req) });
			const user = session ? toSessionUser(session.user) : null;
			if (!user) return refuse(socket, 401, 'unauthenticated', 'Sign in first: the live stream needs a session.');
			s.live.handleUpgrade(req, socket, head, (ws) => {
				track(s, ws);
				acceptLiveSocket(svc, ws, user);
			});
			return;
		}
		refuse(socket, 404, 'not_found', `No WebSocket endpoint at ${url.pathname}.`);
	} catch (e) {
		console.error('upgrade failed', e);
		if (socket.writable) refuse(socket, 503, 'unavailable', 'The server could not take the connection; retry shortly.');
	}
}

/** Graceful shutdown: write what is queued, then tell every socket the server is going away. */
export async function shutdownSockets(): Promise<void> {
	const g = globalThis as typeof globalThis & { [SOCKETS_KEY]?: Sockets };
	const svc = ingestService();
	await svc.shutdown();
	const s = g[SOCKETS_KEY];
	if (!s) return;
	clearInterval(s.timer);
	for (const ws of [...s.ingest.clients, ...s.live.clients]) ws.close(1001, 'server shutting down');
}

/** Makes the hooks known to server.js (and the Vite plugin): called from hooks.server.ts `init`. */
export function registerSocketHooks(): void {
	const g = globalThis as Record<symbol, unknown>;
	g[UPGRADE_KEY] = (req: IncomingMessage, socket: Duplex, head: Buffer) => void handleUpgrade(req, socket, head);
	g[SHUTDOWN_KEY] = shutdownSockets;
	// The instrument's readings endpoint, served by server.js before SvelteKit (see ingest/direct.ts).
	// STILLPOINT_DIRECT_INGEST=off leaves it to the SvelteKit route (a test compares the two).
	if (process.env.STILLPOINT_DIRECT_INGEST !== 'off') g[DIRECT_KEY] = serveReadingsDirect;
	// Start the ingest now: recording runs get their detectors rebuilt before the first reading.
	ingestService();
}
