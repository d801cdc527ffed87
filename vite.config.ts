import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import type { IncomingMessage } from 'node:http';
import type { Duplex } from 'node:stream';
import type { Plugin } from 'vite';
import { defineConfig } from 'vitest/config';

type UpgradeHandler = (req: IncomingMessage, socket: Duplex, head: Buffer) => void;

/**
 * The app's WebSockets (/ws/...) in `vite dev` and `vite preview`, on Vite's own HTTP server; Vite's
 * HMR socket is left alone (it never uses /ws/). Dev loads the same handler server.js uses through
 * ssrLoadModule; preview runs the built app in-process, whose `init` registers it on globalThis.
 */
function stillpointSockets(): Plugin {
	const refuse = (socket: Duplex) => socket.end('HTTP/1.1 503 Service Unavailable\r\nConnection: close\r\n\r\n');
	return {
		name: 'stillpoint-sockets',
		configureServer(server) {
			server.httpServer?.on('upgrade', (req: IncomingMessage, socket: Duplex, head: Buffer) => {
				if (!req.url?.startsWith('/ws/')) return;
				server
					.ssrLoadModule('/src/lib/server/live/upgrade.ts')
					.then((mod) => (mod.handleUpgrade as UpgradeHandler)(req, socket, head))
					.catch((e) => {
						console.error('ws upgrade', e);
						refuse(socket);
					});
			});
		},
		configurePreviewServer(server) {
			server.httpServer.on('upgrade', (req: IncomingMessage, socket: Duplex, head: Buffer) => {
				if (!req.url?.startsWith('/ws/')) return;
				const upgrade = (globalThis as Record<symbol, unknown>)[Symbol.for('stillpoint.upgrade')];
				if (typeof upgrade === 'function') (upgrade as UpgradeHandler)(req, socket, head);
				else refuse(socket);
			});
		}
	};
}

export default defineConfig({
	plugins: [tailwindcss(), sveltekit(), stillpointSockets()],
	server: { port: 5173, strictPort: false },
	test: {
		include: ['src/**/*.spec.ts', 'bench-simulator/**/*.spec.ts', 'tests/integration/**/*.spec.ts'],
		environment: 'node',
		testTimeout: 30_000,
		pool: 'forks'
	}
});
