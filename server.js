// Production server: adapter-node's handler on our own HTTP server, so WebSocket upgrades on /ws/...
// reach the app's socket hub, and instrument readings its direct handler (both registered on globalThis
// by the app when it starts).
import { createServer } from 'node:http';

const UPGRADE_KEY = Symbol.for('stillpoint.upgrade');
const DIRECT_KEY = Symbol.for('stillpoint.direct');
const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? '127.0.0.1';
// SvelteKit's CSRF check and better-auth compare the request's Origin with this; plain HTTP on
// localhost unless the deployment says otherwise. Set before the handler is loaded (it reads env then).
process.env.ORIGIN ??= `http://localhost:${port}`;
// adapter-node refuses bodies past BODY_SIZE_LIMIT (default 512K). The instrument API allows 1 MiB per
// request (src/lib/server/ingest/limits.ts) and answers 413 itself, so the limit here is the same.
process.env.BODY_SIZE_LIMIT ??= '1M';
const { handler } = await import('./build/handler.js');

// The instrument's readings endpoint is answered by the app straight from node:http (its one hot path,
// src/lib/server/ingest/direct.ts); until the app has started, and for everything else, SvelteKit.
const server = createServer((req, res) => {
	const direct = globalThis[DIRECT_KEY];
	if (typeof direct === 'function' && direct(req, res)) return;
	handler(req, res);
});

server.on('upgrade', (request, socket, head) => {
	const upgrade = globalThis[UPGRADE_KEY];
	if (request.url?.startsWith('/ws/') && typeof upgrade === 'function') {
		upgrade(request, socket, head);
	} else {
		socket.end('HTTP/1.1 404 Not Found\r\nConnection: close\r\n\r\n');
	}
});

server.listen(port, host, () => {
	console.log(`Stillpoint listening on http://${host}:${port}`);
});

// Graceful shutdown: stop taking connections, let the app flush pending writes, then exit.
let closing = false;
function shutdown(signal) {
	if (closing) return;
	closing = true;
	console.log(`${signal}: shutting down`);
	const done = globalThis[Symbol.for('stillpoint.shutdown')];
	Promise.resolve(typeof done === 'function' ? done() : undefined).finally(() => {
		server.close(() => process.exit(0));
		server.closeAllConnections?.();
		setTimeout(() => process.exit(0), 5000).unref();
	});
}
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
