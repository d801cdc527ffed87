// Live alerts for the inbox: one WebSocket to /ws/v1/live with the overview subscription, keeping only
// the `alert` messages (docs/live-protocol.md). Reconnects with backoff; a page reload is the fallback.

import type { AlertSummary, LiveServerMessage } from '$lib/live/protocol';

export class AlertFeed {
	/** alerts changed since the page loaded, by id (the newest version of each) */
	changes = $state<Record<string, AlertSummary>>({});
	connected = $state(false);
	private ws: WebSocket | null = null;
	private stopped = false;
	private attempt = 0;
	private timer: ReturnType<typeof setTimeout> | null = null;

	start(): void {
		if (this.stopped || typeof WebSocket === 'undefined') return;
		const loc = globalThis.location;
		const ws = new WebSocket(`${loc.protocol === 'https:' ? 'wss:' : 'ws:'}//${loc.host}/ws/v1/live`);
		this.ws = ws;
		ws.onopen = () => {
			this.attempt = 0;
			this.connected = true;
			ws.send(JSON.stringify({ type: 'subscribe-overview' }));
		};
		ws.onmessage = (ev) => {
			const m = JSON.parse(String(ev.data)) as LiveServerMessage;
			if (m.type === 'alert') this.changes = { ...this.changes, [m.alert.id]: m.alert };
		};
		ws.onclose = () => {
			this.connected = false;
			this.ws = null;
			if (this.stopped) return;
			const wait = Math.min(30_000, 500 * 2 ** Math.min(this.attempt++, 6)) * (0.5 + Math.random() / 2);
			this.timer = setTimeout(() => this.start(), wait);
		};
	}

	reset(): void {
		this.changes = {};
	}

	stop(): void {
		this.stopped = true;
		if (this.timer) clearTimeout(this.timer);
		this.ws?.close(1000, 'page closed');
	}

	/** The page's list with live changes merged in: changed ones updated, new ones first. */
	merge(list: AlertSummary[], keep: (a: AlertSummary) => boolean): AlertSummary[] {
		const byId = new Map(list.map((a) => [a.id, a]));
		for (const a of Object.values(this.changes)) byId.set(a.id, a);
		return [...byId.values()].filter(keep).sort((a, b) => rank(a) - rank(b) || b.lastSeenAtMs - a.lastSeenAtMs);
	}
}

const rank = (a: AlertSummary) => (a.state === 'raised' ? 0 : a.state === 'noted' ? 1 : 2);
