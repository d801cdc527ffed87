// The benches page's live state: the overview stream merged by run, a bounded trace per run, and a
// ticking clock for the "last reading" ages. Wraps LiveClient (plain TypeScript) in runes.
import { LiveClient, type ConnectionState } from './client';
import type { AlertSummary, BenchSummary } from './protocol';
import { SparkBuffer } from '$lib/components/live/sparkline';

export class BenchOverview {
	/** newest summary per run id */
	summaries: Record<string, BenchSummary> = $state({});
	/** bumped when a trace changes (the buffers themselves are plain objects) */
	traceVersion = $state(0);
	now = $state(Date.now());
	connection: ConnectionState = $state('connecting');
	connectionDetail = $state('');
	/** open alerts by bench id; null when the alert module is not part of this build */
	alerts: Record<string, AlertSummary[]> | null = $state(null);
	private readonly traces = new Map<string, SparkBuffer>();
	private client: LiveClient | null = null;
	private timer: ReturnType<typeof setInterval> | null = null;

	constructor(
		initialTraces: Record<string, { t: number; v: number }[]>,
		initialSummaries: BenchSummary[],
		initialAlerts: Record<string, AlertSummary[]> | null,
		private readonly onChange: { unknownRun(runId: string): void; ended(runId: string): void }
	) {
		for (const [runId, pts] of Object.entries(initialTraces)) {
			const b = new SparkBuffer();
			for (const p of pts) b.push(p.t, p.v);
			this.traces.set(runId, b);
		}
		for (const s of initialSummaries) this.summaries[s.runId] = s;
		this.alerts = initialAlerts;
	}

	/** Merges one alert change: cleared ones leave the tile. */
	private onAlert(a: AlertSummary): void {
		if (this.alerts === null || a.benchId === null) return;
		const list = (this.alerts[a.benchId] ?? []).filter((x) => x.id !== a.id);
		if (a.state !== 'cleared') list.unshift(a);
		this.alerts[a.benchId] = list;
	}

	/** Run ids the page knows about (from its load); anything else means the page's data is stale. */
	known = new Set<string>();

	trace(runId: string): SparkBuffer {
		let b = this.traces.get(runId);
		if (!b) this.traces.set(runId, (b = new SparkBuffer()));
		return b;
	}

	start(): void {
		this.client = new LiveClient({
			onState: (s, detail) => {
				this.connection = s;
				this.connectionDetail = detail ?? '';
			},
			onAlert: (a) => this.onAlert(a)
		});
		this.client.subscribeOverview(
			(benches) => {
				let traced = false;
				for (const s of benches) {
					this.summaries[s.runId] = s;
					if (s.latest && !s.latest.timeBackwards) {
						this.trace(s.runId).push(s.latest.timeMs, s.latest.deltaMilliKelvin);
						traced = true;
					}
					if (!this.known.has(s.runId)) this.onChange.unknownRun(s.runId);
				}
				if (traced) this.traceVersion++;
			},
			(runId) => this.onChange.ended(runId)
		);
		this.timer = setInterval(() => (this.now = Date.now()), 1000);
	}

	stop(): void {
		this.client?.close();
		this.client = null;
		if (this.timer) clearInterval(this.timer);
	}
}
