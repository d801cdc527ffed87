// The ingest's limits, in one place: docs/ingest-protocol.md and the instruments page quote them.

function envNumber(name: string, fallback: number): number {
	const v = Number(process.env[name]);
	return Number.isFinite(v) && v > 0 ? v : fallback;
}

/** Readings in one HTTP request (413 past it). */
export const MAX_READINGS_PER_REQUEST = 5000;
/** Bytes in one HTTP request body (413 past it). server.js sets adapter-node's BODY_SIZE_LIMIT to the same. */
export const MAX_BODY_BYTES = 1024 * 1024;
/** Bytes in one WebSocket frame from an instrument (ws closes with 1009 past it). */
export const WS_MAX_PAYLOAD_BYTES = 256 * 1024;
/** Per-token HTTP request rate: refill per second and burst. An operator may raise them by environment. */
export const RATE_REQUESTS_PER_S = envNumber('STILLPOINT_INGEST_RATE_PER_S', 20);
export const RATE_BURST = envNumber('STILLPOINT_INGEST_RATE_BURST', 40);
/** Group commit: a group closes this long after its first reading arrived, or at this many rows. */
export const GROUP_WINDOW_MS = 1;
export const GROUP_MAX_ROWS = 4000;
/** Past this many readings waiting for the writer, HTTP answers 503 + Retry-After and sockets pause. */
export const WRITER_QUEUE_MAX_ROWS = 200_000;
/** A WebSocket connection stops being read while this many of its readings await their commit. */
export const WS_MAX_IN_FLIGHT = 20_000;
/** Server ping interval and the silence after which a connection is dropped (overridable for tests). */
export const PING_INTERVAL_MS = envNumber('STILLPOINT_WS_PING_MS', 15_000);
export const PONG_TIMEOUT_MS = envNumber('STILLPOINT_WS_PONG_TIMEOUT_MS', 30_000);
/** bench_token.last_used_at is written at most this often per token. */
export const LAST_USED_WRITE_INTERVAL_MS = 5_000;
/** Details listed in a 422 (the count of all problems is in the message). */
export const MAX_ERROR_DETAILS = 100;
