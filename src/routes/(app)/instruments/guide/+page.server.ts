import { requireUser } from '$lib/server/auth/guard';
import { MAX_BODY_BYTES, MAX_READINGS_PER_REQUEST, RATE_BURST, RATE_REQUESTS_PER_S, WS_MAX_PAYLOAD_BYTES, PING_INTERVAL_MS, PONG_TIMEOUT_MS } from '$lib/server/ingest/limits';
import type { PageServerLoad } from './$types';

export const load = (({ locals, url }) => {
	requireUser(locals, url);
	return {
		origin: url.origin,
		limits: { maxReadings: MAX_READINGS_PER_REQUEST, maxBodyBytes: MAX_BODY_BYTES, ratePerS: RATE_REQUESTS_PER_S, burst: RATE_BURST, wsMaxPayloadBytes: WS_MAX_PAYLOAD_BYTES, pingS: PING_INTERVAL_MS / 1000, pongTimeoutS: PONG_TIMEOUT_MS / 1000 }
	};
}) satisfies PageServerLoad;
