// One run followed live: detector figures, the newest reading, receipt times for the reading age and
// rate, and the readings handed on to the chart. Wraps LiveClient in runes.
import { LiveClient, type ConnectionState } from './client';
import type { AlertSummary, DetectorState, LiveReading, RunInfo } from './protocol';
import { RateMeter } from '$lib/components/live/format';

export class RunLive {
	detector: DetectorState | null = $state(null);
	info: RunInfo | null = $state(null);
	latest: LiveReading | null = $state(null);
	/** client time the newest reading arrived (or the server's receipt time from the page load) */
	lastReceiptMs: number | null = $state(null);
	readingsSeen = $state(0);
	perMinute: number | null = $state(null);
	ended: string | null = $state(null);
	now = $state(Date.now());
	connection: ConnectionState = $state('connecting');
	/** self-heating (mK) reported by the tracker over time: UTC ms on the instrument's clock */
	selfHeating: { x: number; y: number }[] = [];
	selfHeatingVersion = $state(0);
	/** alerts that arrived while following (newest first); the page merges them with its loaded list */
	alerts: AlertSummary[] = $state([]);
	private readonly rate = new RateMeter();
	private client: LiveClient | null = null;
	private timer: ReturnType<typeof setInterval> | null = null;

	constructor(
		readonly runId: string,
		initial: { detector: DetectorState | null; lastReceiptMs: number | null; latest?: LiveReading | null }
	) {
		this.detector = initial.detector;
		this.latest = initial.latest ?? null;
		this.lastReceiptMs = initial.lastReceiptMs;
	}

	/** Follows the run from `fromSeq` (what the chart already holds + 1). */
	start(fromSeq: number, onReadings: (readings: LiveReading[]) => void, onEnded: (state: string) => void): void {
		this.client = new LiveClient({
			onState: (s) => (this.connection = s),
			onAlert: (a) => {
				if (a.runId === this.runId) this.alerts = [a, ...this.alerts.filter((x) => x.id !== a.id)];
			}
		});
		this.client.subscribe(
			this.runId,
			{
				onRun: (run) => (this.info = run),
				onReadings: (readings, meta) => {
					const nowMs = Date.now();
					if (meta.detector) {
						this.detector = meta.detector;
						const sh = meta.detector.selfHeatingMilliKelvin;
						const last = readings[readings.length - 1] ?? this.latest;
						if (sh !== null && last && (this.selfHeating.length === 0 || this.selfHeating[this.selfHeating.length - 1].x < last.timeMs)) {
							this.selfHeating.push({ x: last.timeMs, y: sh });
							if (this.selfHeating.length > 5000) this.selfHeating.splice(0, 2500);
							this.selfHeatingVersion++;
						}
					}
					if (readings.length === 0) return;
					this.latest = readings[readings.length - 1];
					this.readingsSeen += readings.length + meta.skipped;
					if (meta.source === 'live') {
						this.lastReceiptMs = nowMs;
						this.rate.add(readings.length + meta.skipped, nowMs);
						this.perMinute = this.rate.perMinute(nowMs);
					}
					onReadings(readings);
				},
				onEnded: (state) => {
					this.ended = state;
					onEnded(state);
				}
			},
			fromSeq
		);
		this.timer = setInterval(() => {
			this.now = Date.now();
			this.perMinute = this.rate.perMinute(this.now);
		}, 1000);
	}

	stop(): void {
		this.client?.close();
		this.client = null;
		if (this.timer) clearInterval(this.timer);
	}
}
