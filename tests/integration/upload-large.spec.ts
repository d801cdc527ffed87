// A bridge log of 10^6 rows uploaded as a past run against the real built server: the server streams
// it (chunks to a spool file, papaparse over a file stream, batched staging), so its memory stays
// bounded, and the confirmed run holds exactly 10^6 readings.
import SQLite from 'better-sqlite3';
import { closeSync, mkdtempSync, openSync, readSync, rmSync, statSync, writeSync } from 'node:fs';
import { readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { seededDatabase, signInCookie, startTestServer, type TestServer } from '../support/server';

const ROWS = 1_000_000;
let server: TestServer;
let seed: Awaited<ReturnType<typeof seededDatabase>>['seed'];
let dbPath: string;
let cookie: string;
let dir: string;

beforeAll(async () => {
	const seeded = await seededDatabase(undefined, { pastRuns: false });
	seed = seeded.seed;
	dbPath = seeded.dbPath;
	// A small V8 heap: a server that held the file or its parsed rows in memory would die here.
	server = await startTestServer({ dbPath, env: { NODE_OPTIONS: '--max-old-space-size=64' } });
	const u = DEMO_USERS.find((d) => d.role === 'engineer')!;
	cookie = await signInCookie(server.baseUrl, u.email, u.password);
	dir = mkdtempSync(join(tmpdir(), 'stillpoint-large-'));
}, 60_000);
afterAll(async () => {
	await server?.stop();
	if (dir) rmSync(dir, { recursive: true, force: true });
});

/** Resident memory of the server process, MiB (Linux /proc). */
function rssMiB(pid: number): number {
	const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
	return m ? Number(m[1]) / 1024 : NaN;
}

it(`stores a ${ROWS.toLocaleString('en')}-row log with bounded server memory`, { timeout: 240_000 }, async () => {
	// One reading a second from 2026-01-01T00:00Z (1 767 225 600 000 ms), ratio drifting in the 8th digit.
	const file = join(dir, 'long-freeze.csv');
	const fd = openSync(file, 'w');
	writeSync(fd, 'epoch_ms,ratio,current_mA,channel\n');
	const start = 1_767_225_600_000;
	let buf = '';
	for (let i = 0; i < ROWS; i++) {
		buf += `${start + i * 1000},${(2.56891234 + (i % 997) * 1e-8).toFixed(9)},1.000,1\n`;
		if (buf.length > 1 << 20) (writeSync(fd, buf), (buf = ''));
	}
	writeSync(fd, buf);
	closeSync(fd);
	const size = statSync(file).size;
	expect(size).toBeGreaterThan(30 * 1024 * 1024); // 34 bytes a row

	const pid = server.process.pid!;
	const baseline = rssMiB(pid);
	let peak = baseline;
	const sampler = setInterval(() => (peak = Math.max(peak, rssMiB(pid))), 100);
	const t0 = Date.now();
	try {
		const headers = { cookie, origin: server.baseUrl };
		const created = await fetch(`${server.baseUrl}/api/v1/uploads`, { method: 'POST', headers: { ...headers, 'content-type': 'application/json' }, body: JSON.stringify({ purpose: 'run-log', filename: 'long-freeze.csv', sizeBytes: size }) });
		expect(created.status).toBe(201);
		const { id, chunkBytes } = (await created.json()) as { id: string; chunkBytes: number };
		const chunk = Buffer.alloc(chunkBytes);
		const rfd = openSync(file, 'r');
		for (let offset = 0; offset < size; ) {
			const n = readSync(rfd, chunk, 0, chunkBytes, offset);
			const res = await fetch(`${server.baseUrl}/api/v1/uploads/${id}/chunk`, { method: 'POST', headers: { ...headers, 'content-type': 'application/octet-stream', 'x-upload-offset': String(offset) }, body: chunk.subarray(0, n) });
			expect(res.status).toBe(200);
			offset += n;
		}
		closeSync(rfd);

		const mapping = { delimiter: ',', headerRow: true, columns: { time: 0, ratio: 1, current: 2, channel: 3, seq: null }, timeUnit: 'epoch-ms', timeZone: 'UTC', currentUnit: 'mA', channelDefault: 1 };
		expect((await fetch(`${server.baseUrl}/api/v1/uploads/${id}/parse`, { method: 'POST', headers: { ...headers, 'content-type': 'application/json' }, body: JSON.stringify(mapping) })).status).toBe(202);
		const progress: number[] = [];
		let status: { state: string; goodRows: number; badRows: number; parsedBytes: number };
		for (;;) {
			status = await (await fetch(`${server.baseUrl}/api/v1/uploads/${id}`, { headers })).json();
			progress.push(status.parsedBytes);
			if (status.state !== 'parsing') break;
			await new Promise((r) => setTimeout(r, 200));
		}
		expect(status).toMatchObject({ state: 'parsed', goodRows: ROWS, badRows: 0, parsedBytes: size });
		// The server reported progress while it parsed (more than one distinct value on the way).
		expect(new Set(progress).size).toBeGreaterThan(1);

		const confirm = await fetch(`${server.baseUrl}/api/v1/uploads/${id}/confirm`, {
			method: 'POST',
			headers: { ...headers, 'content-type': 'application/json' },
			body: JSON.stringify({ benchId: seed.benchIds[2], cellId: seed.cellIds['KV-Zn-05'], thermometerId: seed.thermometerIds['KV-S-4471'], resistorId: seed.resistorIds['KV-R25-01'], fixedPoint: 'Zn', kind: 'freeze', sensorDepthM: 0.18, gasPressurePa: 101325, notes: '', skipBadRows: false })
		});
		expect(confirm.status, server.output().slice(-3000)).toBe(201);
		const { runId } = (await confirm.json()) as { runId: number };

		const db = new SQLite(dbPath, { readonly: true });
		const stats = db.prepare('select count(*) as n, min(seq) as lo, max(seq) as hi, min(time_ms) as t0, max(time_ms) as t1 from reading where run_id = ?').get(runId);
		const run = db.prepare('select state, reading_count, highest_seq from run where id = ?').get(runId);
		const staged = db.prepare('select count(*) as n from upload_row').get() as { n: number };
		const sample = db.prepare('select ratio from reading where run_id = ? and seq = 1234').get(runId) as { ratio: number };
		db.close();
		expect(stats).toEqual({ n: ROWS, lo: 0, hi: ROWS - 1, t0: start, t1: start + (ROWS - 1) * 1000 });
		expect(run).toEqual({ state: 'finished', reading_count: ROWS, highest_seq: ROWS - 1 });
		expect(staged.n).toBe(0);
		// Row 1234 (0-based): ratio 2.56891234 + (1234 mod 997 = 237) × 1e-8 = 2.56891471.
		expect(sample.ratio).toBe(2.56891471);
	} finally {
		clearInterval(sampler);
	}
	// The file is ~34 MB; holding it and its 10^6 parsed rows in memory would add over 200 MiB (and
	// overflow the 64 MiB heap). What growth there is comes from garbage the collector has not yet reclaimed.
	console.log(`10^6 rows in ${((Date.now() - t0) / 1000).toFixed(1)} s; server RSS baseline ${baseline.toFixed(0)} MiB, peak ${peak.toFixed(0)} MiB`);
	expect(peak - baseline).toBeLessThan(100);
});
