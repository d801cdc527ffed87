// Ingest benchmark: `npx tsx scripts/bench/ingest.ts` (needs a fresh `npx vite build`).
//
// Each figure is a ratio against a baseline measured in the same run on the same machine:
//  1. HTTP batch ingest (500 readings a request, several concurrent clients in a second process,
//     against the real server process) ÷ raw better-sqlite3 prepared inserts in 1 000-row transactions.
//  2. WebSocket streaming of single readings from 50 connections ÷ raw autocommit inserts.
//  3. Latency from an instrument's send to a subscribed browser-protocol client's receipt at
//     1 000 readings/s over 50 benches (p50/p95/p99; target p99 < 50 ms).
// Bounded loops, loopback only; about a minute in all.

import { spawn } from 'node:child_process';
import { Agent, request as httpRequest } from 'node:http';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import SQLite from 'better-sqlite3';
import WebSocket from 'ws';

const HERE = fileURLToPath(import.meta.url);
const BENCHES = 50;
const HTTP_CLIENTS = 6;
const HTTP_BATCH = 500;
const HTTP_BATCHES_PER_CLIENT = 120; // 6 × 120 × 500 = 360 000 readings
const WS_CONNECTIONS = 50;
const WS_SECONDS = 8;
const WS_WINDOW = 400; // unacknowledged single-reading frames per connection
const LATENCY_RATE_PER_S = 1000;
const LATENCY_SECONDS = 10;
/** Rounds of each throughput phase, each with its own baseline (the median round is reported). */
const ROUNDS = Number(process.env.STILLPOINT_BENCH_ROUNDS ?? 5);

interface ChildConfig {
	baseUrl: string;
	cookie: string;
	ratio: number;
	runs: { runId: number; token: string }[];
}

function line(name: string, value: number, unit: string, ratio: number | null, note = ''): string {
	const v = value >= 100 ? Math.round(value).toLocaleString('en-GB').replace(/,/g, ' ') : value.toFixed(2);
	return `${name}: ${v} ${unit}${ratio === null ? '' : ` (${ratio.toFixed(2)} x baseline)`}${note ? ` ${note}` : ''}`;
}

// ---------------------------------------------------------------- baselines (this process)

function baselineDb(): { db: SQLite.Database; dir: string } {
	const dir = mkdtempSync(join(tmpdir(), 'stillpoint-bench-'));
	const db = new SQLite(join(dir, 'baseline.db'));
	db.pragma('journal_mode = WAL');
	db.pragma('synchronous = NORMAL');
	db.exec('create table reading (run_id integer not null, seq integer not null, time_ms integer not null, ratio real not null, current_ma real not null, channel integer not null, primary key (run_id, seq)) without rowid');
	return { db, dir };
}

function baselineTransactions(rows = 300_000): number {
	const { db, dir } = baselineDb();
	const ins = db.prepare('insert into reading values (?, ?, ?, ?, ?, ?)');
	const batch = db.transaction((from: number) => {
		for (let i = from; i < from + 1000; i++) ins.run(1, i, 1_760_000_000_000 + i * 1000, 1.1426485 + i * 1e-12, 1, 1);
	});
	const t0 = performance.now();
	for (let from = 0; from < rows; from += 1000) batch(from);
	const s = (performance.now() - t0) / 1000;
	db.close();
	rmSync(dir, { recursive: true, force: true });
	return rows / s;
}

function baselineAutocommit(rows = 40_000): number {
	const { db, dir } = baselineDb();
	const ins = db.prepare('insert into reading values (?, ?, ?, ?, ?, ?)');
	const t0 = performance.now();
	for (let i = 0; i < rows; i++) ins.run(1, i, 1_760_000_000_000 + i * 1000, 1.1426485 + i * 1e-12, 1, 1);
	const s = (performance.now() - t0) / 1000;
	db.close();
	rmSync(dir, { recursive: true, force: true });
	return rows / s;
}

// ---------------------------------------------------------------- load generators (child process)

function reading(seq: number, ratio: number, timeMs = 1_760_000_000_000 + seq * 1000) {
	return { seq, timeMs, ratio: ratio * (1 + ((seq % 11) - 5) * 2e-9), currentMilliAmp: 1, channel: 1 };
}

/** One POST on a keep-alive connection; node:http, so the load generator's own cost stays small. */
function post(agent: Agent, url: URL, headers: Record<string, string>, body: Buffer): Promise<{ status: number; text: string }> {
	return new Promise((resolve, reject) => {
		const req = httpRequest(url, { method: 'POST', agent, headers: { ...headers, 'content-length': String(body.length) } }, (res) => {
			const chunks: Buffer[] = [];
			res.on('data', (c: Buffer) => chunks.push(c));
			res.on('end', () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString('utf8') }));
			res.on('error', reject);
		});
		req.on('error', reject);
		req.end(body);
	});
}

async function childHttp(cfg: ChildConfig): Promise<{ rowsPerS: number; rows: number; errors: number }> {
	const runs = cfg.runs.slice(0, HTTP_CLIENTS);
	// Bodies are made (and encoded) before the clock starts: the client's own JSON work is not the server's.
	const bodies = runs.map(() => Array.from({ length: HTTP_BATCHES_PER_CLIENT }, (_, b) => Buffer.from(JSON.stringify({ readings: Array.from({ length: HTTP_BATCH }, (_, i) => reading(b * HTTP_BATCH + i, cfg.ratio)) }))));
	const agent = new Agent({ keepAlive: true, maxSockets: HTTP_CLIENTS });
	let rows = 0;
	let errors = 0;
	const t0 = performance.now();
	await Promise.all(
		runs.map(async (run, c) => {
			const url = new URL(`${cfg.baseUrl}/api/v1/runs/${run.runId}/readings`);
			const headers = { authorization: `Bearer ${run.token}`, 'content-type': 'application/json' };
			for (const body of bodies[c]) {
				const res = await post(agent, url, headers, body);
				const j = JSON.parse(res.text) as { accepted?: number };
				if (res.status === 200) rows += j.accepted ?? 0;
				else errors++;
			}
		})
	);
	const s = (performance.now() - t0) / 1000;
	agent.destroy();
	return { rowsPerS: rows / s, rows, errors };
}

function ingestSocket(cfg: ChildConfig, run: { runId: number; token: string }): Promise<WebSocket> {
	return new Promise((resolve, reject) => {
		const ws = new WebSocket(`${cfg.baseUrl.replace(/^http/, 'ws')}/ws/v1/ingest?runId=${run.runId}`, { headers: { authorization: `Bearer ${run.token}` } });
		ws.once('message', () => resolve(ws)); // hello
		ws.once('error', reject);
	});
}

async function childWs(cfg: ChildConfig): Promise<{ rowsPerS: number; rows: number }> {
	const sockets = await Promise.all(cfg.runs.slice(0, WS_CONNECTIONS).map((r) => ingestSocket(cfg, r)));
	let acked = 0;
	const endAt = performance.now() + WS_SECONDS * 1000;
	const t0 = performance.now();
	await Promise.all(
		sockets.map(
			(ws) =>
				new Promise<void>((done) => {
					let next = 0;
					let ackedSeq = -1;
					const pump = () => {
						if (performance.now() >= endAt) return;
						while (next - ackedSeq - 1 < WS_WINDOW) ws.send(JSON.stringify({ type: 'reading', ...reading(next++, cfg.ratio) }));
					};
					ws.on('message', (d) => {
						const m = JSON.parse(d.toString()) as { type: string; highestDurableSeq?: number };
						if (m.type !== 'ack') return;
						acked += m.highestDurableSeq! - ackedSeq;
						ackedSeq = m.highestDurableSeq!;
						if (performance.now() < endAt) pump();
						else if (ackedSeq === next - 1) done();
					});
					pump();
				})
		)
	);
	const s = (performance.now() - t0) / 1000;
	for (const ws of sockets) ws.close();
	return { rowsPerS: acked / s, rows: acked };
}

async function childLatency(cfg: ChildConfig): Promise<{ p50: number; p95: number; p99: number; received: number; sent: number }> {
	const runs = cfg.runs.slice(0, BENCHES);
	const sockets = await Promise.all(runs.map((r) => ingestSocket(cfg, r)));
	const sentAt = new Map<string, number>();
	const latencies: number[] = [];
	const live = new WebSocket(`${cfg.baseUrl.replace(/^http/, 'ws')}/ws/v1/live`, { headers: { cookie: cfg.cookie } });
	await new Promise((r, j) => (live.once('open', r), live.once('error', j)));
	let synced = 0;
	const allSynced = new Promise<void>((resolve) => {
		live.on('message', (d) => {
			const now = performance.now();
			const m = JSON.parse(d.toString()) as { type: string; runId?: string; source?: string; readings?: { seq: number }[] };
			if (m.type === 'synced' && ++synced === runs.length) resolve();
			if (m.type !== 'readings' || m.source !== 'live') return;
			for (const r of m.readings!) {
				const t = sentAt.get(`${m.runId}:${r.seq}`);
				if (t !== undefined) latencies.push(now - t);
			}
		});
	});
	for (const r of runs) live.send(JSON.stringify({ type: 'subscribe', runId: String(r.runId) }));
	await allSynced;
	// 1 000 readings/s over 50 benches: every bench sends one reading each 50 ms, staggered by 1 ms.
	const periodMs = (1000 * runs.length) / LATENCY_RATE_PER_S;
	let sent = 0;
	await Promise.all(
		sockets.map(
			(ws, i) =>
				new Promise<void>((done) => {
					let seq = 0;
					const total = Math.round((LATENCY_SECONDS * 1000) / periodMs);
					const tick = () => {
						const t = performance.now();
						sentAt.set(`${runs[i].runId}:${seq}`, t);
						ws.send(JSON.stringify({ type: 'reading', ...reading(seq, cfg.ratio, Date.now()) }));
						seq++;
						sent++;
						if (seq < total) setTimeout(tick, periodMs - ((performance.now() - t) % periodMs));
						else done();
					};
					setTimeout(tick, (i * periodMs) / runs.length);
				})
		)
	);
	await new Promise((r) => setTimeout(r, 500));
	live.close();
	for (const ws of sockets) ws.close();
	latencies.sort((a, b) => a - b);
	const q = (p: number) => latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))] ?? NaN;
	return { p50: q(0.5), p95: q(0.95), p99: q(0.99), received: latencies.length, sent };
}

function runChild<T>(mode: string, cfg: ChildConfig): Promise<T> {
	const dir = mkdtempSync(join(tmpdir(), 'stillpoint-bench-cfg-'));
	const file = join(dir, 'config.json');
	writeFileSync(file, JSON.stringify(cfg));
	return new Promise((resolve, reject) => {
		const child = spawn(process.execPath, [...(process.env.STILLPOINT_BENCH_CPU_PROF ? ['--cpu-prof', `--cpu-prof-dir=${process.env.STILLPOINT_BENCH_CPU_PROF}`] : []), '--import', 'tsx', HERE, '--child', mode, file], { stdio: ['ignore', 'pipe', 'inherit'] });
		let out = '';
		child.stdout.on('data', (d) => (out += d));
		child.on('exit', (code) => {
			rmSync(dir, { recursive: true, force: true });
			if (code !== 0) return reject(new Error(`bench child ${mode} exited ${code}: ${out}`));
			resolve(JSON.parse(out.trim().split('\n').pop()!) as T);
		});
	});
}

// ---------------------------------------------------------------- set-up and the whole run

async function prepareRuns(): Promise<{ cfgFor: () => Promise<ChildConfig>; stop: () => Promise<void> }> {
	const { seededDatabase, startTestServer, signInCookie } = await import('../../tests/support/server');
	const { createKysely, openSqlite } = await import('../../src/lib/server/db/index');
	const { createRun, transitionRun } = await import('../../src/lib/server/repositories/run-lifecycle');
	const { createBenchToken } = await import('../../src/lib/server/tokens/index');
	const { DEMO_USERS, DEMO_THERMOMETERS, DEMO_RESISTORS } = await import('../../src/lib/server/demo/scenario');
	const { expectedSensorKelvin, ratioFromTemperature } = await import('../../src/lib/metrology/index');

	const { dbPath, seed } = await seededDatabase();
	const db = createKysely(openSqlite(dbPath));
	const adminDemo = DEMO_USERS.find((u) => u.role === 'admin')!;
	const admin = { id: seed.userIds[adminDemo.email], email: adminDemo.email, name: adminDemo.name, role: 'admin' as const };
	const benchIds = [...seed.benchIds];
	for (let i = benchIds.length; i < BENCHES; i++) {
		const row = await db.insertInto('bench').values({ name: `Load bench ${i + 1}`, heat_source_kind: 'bath', created_at: Date.now(), retired_at: null }).returning('id').executeTakeFirstOrThrow();
		benchIds.push(row.id);
	}
	const cell = await db.selectFrom('cell').select('id').where('fixed_point', '=', 'Ga').executeTakeFirstOrThrow();
	const th = DEMO_THERMOMETERS[0];
	const rs = DEMO_RESISTORS[0];
	const cal = await db.selectFrom('calibration').select(['subrange', 'coefficients_json']).where('thermometer_id', '=', seed.thermometerIds[th.serial]).executeTakeFirst();
	const w = ratioFromTemperature(expectedSensorKelvin('Ga', {}), (cal?.subrange ?? 'TPW-Ga') as never, cal ? JSON.parse(cal.coefficients_json) : { a: 0 });
	const ratio = (w * th.r_tpw_ohm) / rs.calibrated_ohm;
	const server = await startTestServer({ dbPath, env: { STILLPOINT_INGEST_RATE_PER_S: '100000', STILLPOINT_INGEST_RATE_BURST: '100000' } });
	const cookie = await signInCookie(server.baseUrl, adminDemo.email, adminDemo.password);
	const tokens = await Promise.all(benchIds.map((b) => createBenchToken(db, admin, b, 'benchmark')));
	let current: number[] = [];
	return {
		// Fresh recording runs on every bench for each phase, so each starts from an empty run.
		async cfgFor() {
			for (const id of current) await transitionRun(db, admin, id, 'finish');
			current = [];
			for (const b of benchIds) {
				const run = await createRun(db, admin, { bench_id: b, cell_id: cell.id, thermometer_id: seed.thermometerIds[th.serial], resistor_id: seed.resistorIds[rs.serial], fixed_point: 'Ga', kind: 'melt' });
				await transitionRun(db, admin, run.id, 'start');
				current.push(run.id);
			}
			return { baseUrl: server.baseUrl, cookie, ratio, runs: current.map((runId, i) => ({ runId, token: tokens[i].token })) };
		},
		async stop() {
			await server.stop();
			await db.destroy();
		}
	};
}

/** CPU time of the whole machine from /proc/stat: [busy, total] in clock ticks. */
function cpuTicks(): [number, number] {
	const f = readFileSync('/proc/stat', 'utf8').split('\n')[0].trim().split(/\s+/).slice(1).map(Number);
	const idle = f[3] + (f[4] ?? 0);
	const total = f.reduce((a, b) => a + b, 0);
	return [total - idle, total];
}

/**
 * Waits until the machine is quiet (the server's reducer has caught up with the previous phase, the
 * last child has exited, the analyses of the runs just finished are done), so one phase's leftovers do
 * not run inside the next one's clock. The server notices finished runs on its sweep (every 2 s) and
 * only then starts their final analysis: without the first wait, the second round of every phase met
 * the first round's analyses (it was the lowest round in each of four 5-round runs).
 */
async function quiet(maxMs = 20_000): Promise<void> {
	await new Promise((r) => setTimeout(r, 2_500));
	const end = Date.now() + maxMs;
	while (Date.now() < end) {
		const [b0, t0] = cpuTicks();
		await new Promise((r) => setTimeout(r, 300));
		const [b1, t1] = cpuTicks();
		if (t1 > t0 && (b1 - b0) / (t1 - t0) < 0.1) return;
	}
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/**
 * One throughput phase in ROUNDS rounds. This machine's speed drifts by a factor of two within minutes
 * (shared cores), so each round divides by its own baseline: the mean of one measured just before and
 * one just after the phase. The median round is reported, with every round's ratio.
 */
async function inRounds(env: { cfgFor: () => Promise<ChildConfig> }, mode: 'http' | 'ws', baseline: () => number) {
	const rounds: { result: { rowsPerS: number; rows: number; errors?: number }; baseline: number; ratio: number }[] = [];
	for (let round = 0; round < ROUNDS; round++) {
		const cfg = await env.cfgFor();
		await quiet();
		const before = baseline();
		const result = await runChild<{ rowsPerS: number; rows: number; errors?: number }>(mode, cfg);
		const b = (before + baseline()) / 2;
		rounds.push({ result, baseline: b, ratio: result.rowsPerS / b });
	}
	const mid = rounds.find((r) => r.ratio === median(rounds.map((x) => x.ratio)))!;
	return {
		median: mid.result,
		baseline: mid.baseline,
		ratio: mid.ratio,
		ratios: rounds.map((r) => r.ratio.toFixed(2)).join(', '),
		baselines: `${rounds.map((r) => Math.round(r.baseline / 1000)).join(', ')} k`,
		errors: rounds.reduce((a, r) => a + (r.result.errors ?? 0), 0)
	};
}

export async function runIngestBench(): Promise<string[]> {
	const lines: string[] = [];
	const say = (l: string) => {
		lines.push(l);
		console.log(l);
	};
	const env = await prepareRuns();
	try {
		const http = await inRounds(env, 'http', baselineTransactions);
		say(line('baseline raw prepared inserts, 1 000-row transactions', http.baseline, 'rows/s', null, `(median round; rounds: ${http.baselines})`));
		say(line(`http batch ingest (${HTTP_CLIENTS} clients, ${HTTP_BATCH}/request)`, http.median.rowsPerS, 'rows/s', http.ratio, `target >= 0.4; median of ${ROUNDS} rounds (${http.ratios}); ${http.median.rows} rows, ${http.errors} errors`));
		const ws = await inRounds(env, 'ws', baselineAutocommit);
		say(line('baseline raw autocommit inserts', ws.baseline, 'rows/s', null, `(median round; rounds: ${ws.baselines})`));
		say(line(`websocket single-reading streaming (${WS_CONNECTIONS} connections)`, ws.median.rowsPerS, 'rows/s', ws.ratio, `target >= 1; median of ${ROUNDS} rounds (${ws.ratios}); ${ws.median.rows} rows acknowledged`));
		const latCfg = await env.cfgFor();
		await quiet();
		const lat = await runChild<{ p50: number; p95: number; p99: number; received: number; sent: number }>('latency', latCfg);
		const note = `(${lat.received}/${lat.sent} readings seen by the subscriber)`;
		say(line(`live latency p50 at ${LATENCY_RATE_PER_S}/s over ${BENCHES} benches`, lat.p50, 'ms', lat.p50 / 50, note));
		say(line(`live latency p95 at ${LATENCY_RATE_PER_S}/s over ${BENCHES} benches`, lat.p95, 'ms', lat.p95 / 50, note));
		say(line(`live latency p99 at ${LATENCY_RATE_PER_S}/s over ${BENCHES} benches`, lat.p99, 'ms', lat.p99 / 50, `target < 1 (50 ms budget) ${note}`));
	} finally {
		await env.stop();
	}
	return lines;
}

const childIndex = process.argv.indexOf('--child');
if (childIndex >= 0) {
	const mode = process.argv[childIndex + 1];
	const cfg = JSON.parse(readFileSync(process.argv[childIndex + 2], 'utf8')) as ChildConfig;
	const job = mode === 'http' ? childHttp(cfg) : mode === 'ws' ? childWs(cfg) : childLatency(cfg);
	job.then(
		(r) => {
			console.log(JSON.stringify(r));
			process.exit(0);
		},
		(e) => {
			console.error(e);
			process.exit(1);
		}
	);
} else if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
	runIngestBench().then(
		() => process.exit(0),
		(e) => {
			console.error(e);
			process.exit(1);
		}
	);
}
