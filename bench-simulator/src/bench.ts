// runBench(): one simulated bench streaming in (sped-up) real time to stdout, HTTP or WebSocket.
// Used by the CLI and by the demo script in-process.

import type { Writable } from 'node:stream';
import { HttpIngestClient } from './client-http';
import { WsIngestClient } from './client-ws';
import type { ClientOptions, ClientStats, IngestClient } from './client-common';
import type { ScenarioOverrides } from './params';
import { DEFAULT_SEED, simulateStream } from './simulate';
import type { GroundTruth, SimEvent, SimReading } from './types';

export interface BenchOptions {
	scenario: string;
	overrides?: ScenarioOverrides;
	seed?: number;
	target: 'stdout' | 'http' | 'ws';
	/** http/ws: base URL, bench token, optional run id, client tuning. */
	client?: Omit<ClientOptions, 'url' | 'token' | 'runId' | 'log'>;
	url?: string;
	token?: string;
	runId?: string;
	/** Simulated seconds per real second (default 300); ignored with asFastAsPossible. */
	speed?: number;
	asFastAsPossible?: boolean;
	/** stdout target: where NDJSON goes (default process.stdout). */
	out?: Writable;
	log?: (message: string) => void;
	onEvent?: (e: SimEvent) => void;
	onReading?: (r: SimReading) => void;
}

export interface BenchResult {
	readingsEmitted: number;
	skippedAlreadyStored: number;
	stoppedEarly: boolean;
	client: ClientStats | null;
}

export interface BenchController {
	readonly truth: GroundTruth;
	/** Resolves when the run is over and everything sent was acknowledged; rejects on a fatal error. */
	readonly done: Promise<BenchResult>;
	stop(): Promise<void>;
	stats(): { readingsEmitted: number; client: ClientStats | null };
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

function writeLine(out: Writable, line: string): Promise<void> | null {
	return out.write(line) ? null : new Promise((resolve) => out.once('drain', () => resolve()));
}

export function runBench(options: BenchOptions): BenchController {
	const stream = simulateStream(options.scenario, options.overrides, options.seed ?? DEFAULT_SEED);
	const log = options.log ?? (() => {});
	const speed = options.speed ?? 300;
	let stopping = false;
	let emitted = 0;
	let client: IngestClient | null = null;

	if (options.target !== 'stdout') {
		if (!options.url || !options.token) throw new Error(`target ${options.target} needs url and token`);
		const co: ClientOptions = { ...(options.client ?? {}), url: options.url, token: options.token, runId: options.runId, log };
		client = options.target === 'http' ? new HttpIngestClient(co) : new WsIngestClient(co);
	}

	const run = async (): Promise<BenchResult> => {
		let resumeAfter = -1;
		if (client) {
			const started = await client.start();
			resumeAfter = started.highestDurableSeq;
			log(`run ${started.runId}: server holds up to seq ${resumeAfter}${resumeAfter >= 0 ? '; resuming after it' : ''}`);
		}
		const out = options.out ?? process.stdout;
		let clock: { realStart: number; simStart: number } | null = null;
		let skipped = 0;
		let lastYield = Date.now();
		for (const item of stream.items) {
			if (stopping) break;
			const timeMs = item.type === 'reading' ? item.reading.timeMs : item.event.timeMs;
			if (item.type === 'reading' && item.reading.seq <= resumeAfter) {
				skipped++;
				continue;
			}
			// pacing: simulated time runs `speed` times faster than the wall clock
			if (!options.asFastAsPossible) {
				clock ??= { realStart: Date.now(), simStart: timeMs };
				const dueReal = clock.realStart + (timeMs - clock.simStart) / speed;
				const wait = dueReal - Date.now();
				if (wait > 15) await sleep(wait);
			} else if (Date.now() - lastYield > 50) {
				await sleep(0); // let sockets and timers breathe
				lastYield = Date.now();
			}
			if (stopping) break;
			if (item.type === 'event') {
				options.onEvent?.(item.event);
				if (item.event.kind === 'fault-disconnect' && client) {
					const realMs = options.asFastAsPossible ? 200 : (item.event.durationMs ?? 0) / speed;
					client.disconnectFor(Math.max(50, realMs));
				}
				continue;
			}
			options.onReading?.(item.reading);
			emitted++;
			if (client) await Promise.race([client.enqueue(item.reading), client.failed]);
			else {
				const wait = writeLine(out, JSON.stringify(item.reading) + '\n');
				if (wait) await wait;
			}
		}
		if (client) {
			if (!stopping) await Promise.race([client.finish(), client.failed]);
			await client.close();
		}
		return { readingsEmitted: emitted, skippedAlreadyStored: skipped, stoppedEarly: stopping, client: client?.stats() ?? null };
	};

	const done = run().catch(async (e) => {
		await client?.close().catch(() => {});
		throw e;
	});
	done.catch(() => {});

	return {
		truth: stream.truth,
		done,
		async stop() {
			stopping = true;
			await done.catch(() => {});
		},
		stats: () => ({ readingsEmitted: emitted, client: client?.stats() ?? null })
	};
}
