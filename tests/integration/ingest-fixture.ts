// Shared set-up of the ingest integration tests: a seeded database file, recording runs on benches,
// bench tokens, a real server process, and small HTTP / WebSocket helpers.
import WebSocket from 'ws';
import type { Kysely } from 'kysely';
import { createKysely, openSqlite } from '../../src/lib/server/db/index';
import type { Database, RunKind } from '../../src/lib/server/db/schema';
import type { SessionUser } from '../../src/lib/server/auth/types';
import { createRun, transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { createBenchToken } from '../../src/lib/server/tokens/index';
import { fixedPoint, ratioFromTemperature, expectedSensorKelvin, type SubrangeId } from '../../src/lib/metrology/index';
import { DEMO_THERMOMETERS, DEMO_RESISTORS, DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { seededDatabase, startTestServer, signInCookie, type TestServer } from '../support/server';

export interface Reading {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel?: number;
}

export interface Fixture {
	server: TestServer;
	db: Kysely<Database>;
	admin: SessionUser;
	benchIds: number[];
	/** a fresh recording run on the bench (finishing any run recording there) with a token for it */
	recordingRun(benchIndex: number, opts?: { fixedPoint?: 'Ga' | 'Zn' | 'TPW'; kind?: RunKind }): Promise<{ runId: number; benchId: number; token: string; tokenId: number }>;
	token(benchIndex: number): Promise<{ token: string; tokenId: number }>;
	/** a bridge ratio for a temperature offset (mK) from the run's expected value */
	ratioFor(fixedPoint: 'Ga' | 'Zn' | 'TPW', offsetMilliKelvin: number): number;
	cookie(email?: string): Promise<string>;
	readingCount(runId: number): Promise<number>;
	close(): Promise<void>;
}

const THERMOMETER = DEMO_THERMOMETERS[0]; // TPW–Sn–Zn sub-range: Ga, Zn and TPW are inside it
const RESISTOR = DEMO_RESISTORS[0];

export async function ingestFixture(env: Record<string, string> = {}): Promise<Fixture> {
	const { dbPath, seed } = await seededDatabase();
	const db = createKysely(openSqlite(dbPath));
	const adminUser = DEMO_USERS.find((u) => u.role === 'admin')!;
	const admin: SessionUser = { id: seed.userIds[adminUser.email], email: adminUser.email, name: adminUser.name, role: 'admin' };
	const server = await startTestServer({ dbPath, env });
	const cellFor: Record<string, number> = {
		Ga: (await db.selectFrom('cell').select('id').where('fixed_point', '=', 'Ga').executeTakeFirstOrThrow()).id,
		Zn: (await db.selectFrom('cell').select('id').where('fixed_point', '=', 'Zn').executeTakeFirstOrThrow()).id,
		TPW: (await db.selectFrom('cell').select('id').where('fixed_point', '=', 'TPW').executeTakeFirstOrThrow()).id
	};
	const cal = await db.selectFrom('calibration').select(['coefficients_json', 'subrange']).where('thermometer_id', '=', seed.thermometerIds[THERMOMETER.serial]).executeTakeFirst();
	const fixture: Fixture = {
		server,
		db,
		admin,
		benchIds: seed.benchIds,
		async recordingRun(benchIndex, opts = {}) {
			const benchId = seed.benchIds[benchIndex];
			const busy = await db.selectFrom('run').select('id').where('bench_id', '=', benchId).where('state', '=', 'recording').execute();
			for (const b of busy) await transitionRun(db, admin, b.id, 'finish');
			const point = opts.fixedPoint ?? 'Ga';
			const run = await createRun(db, admin, {
				bench_id: benchId,
				cell_id: cellFor[point],
				thermometer_id: seed.thermometerIds[THERMOMETER.serial],
				resistor_id: seed.resistorIds[RESISTOR.serial],
				fixed_point: point,
				kind: opts.kind ?? (point === 'TPW' ? 'triple-point' : 'melt')
			});
			await transitionRun(db, admin, run.id, 'start');
			const t = await createBenchToken(db, admin, benchId, `test ${benchIndex}`);
			return { runId: run.id, benchId, token: t.token, tokenId: t.id };
		},
		async token(benchIndex) {
			const t = await createBenchToken(db, admin, seed.benchIds[benchIndex], 'extra');
			return { token: t.token, tokenId: t.id };
		},
		ratioFor(point, offsetMilliKelvin) {
			const kelvin = expectedSensorKelvin(point, { depthMetre: 0, pressurePa: 101325 }) + offsetMilliKelvin / 1000;
			const subrange = (cal?.subrange ?? 'TPW-Sn-Zn') as SubrangeId;
			const w = ratioFromTemperature(kelvin, subrange, cal ? JSON.parse(cal.coefficients_json) : { a: 0, b: 0 });
			void fixedPoint;
			return (w * THERMOMETER.r_tpw_ohm) / RESISTOR.calibrated_ohm;
		},
		async cookie(email = adminUser.email) {
			const u = DEMO_USERS.find((x) => x.email === email)!;
			return signInCookie(server.baseUrl, u.email, u.password);
		},
		async readingCount(runId) {
			const r = await db.selectFrom('reading').select((eb) => eb.fn.countAll<number>().as('n')).where('run_id', '=', runId).executeTakeFirstOrThrow();
			return Number(r.n);
		},
		async close() {
			await server.stop();
			await db.destroy();
		}
	};
	return fixture;
}

export function readings(from: number, count: number, ratio: number, t0Ms = 1_760_000_000_000, stepMs = 1000): Reading[] {
	return Array.from({ length: count }, (_, i) => ({ seq: from + i, timeMs: t0Ms + (from + i) * stepMs, ratio: ratio * (1 + ((i % 7) - 3) * 1e-9), currentMilliAmp: 1, channel: 1 }));
}

export async function post(baseUrl: string, runId: number | string, token: string | null, body: unknown, contentType = 'application/json'): Promise<{ status: number; body: any; headers: Headers }> {
	const res = await fetch(`${baseUrl}/api/v1/runs/${runId}/readings`, {
		method: 'POST',
		headers: { ...(token ? { authorization: `Bearer ${token}` } : {}), 'content-type': contentType },
		body: typeof body === 'string' ? body : JSON.stringify(body)
	});
	const text = await res.text();
	let parsed: unknown = text;
	try {
		parsed = JSON.parse(text);
	} catch {
		/* not JSON */
	}
	return { status: res.status, body: parsed, headers: res.headers };
}

export type Collector = ReturnType<typeof collector>;

/** Opens a WebSocket (messages collected from the start); or the HTTP status the upgrade was refused with. */
export function openSocket(url: string, headers: Record<string, string>, options: WebSocket.ClientOptions = {}): Promise<{ ws: WebSocket; status: 101; c: Collector } | { ws: null; status: number; body: string; c: null }> {
	return new Promise((resolve, reject) => {
		const ws = new WebSocket(url, { headers, ...options });
		const c = collector(ws);
		ws.once('open', () => resolve({ ws, status: 101, c }));
		ws.once('unexpected-response', (_req, res) => {
			let body = '';
			res.on('data', (chunk: Buffer) => (body += chunk));
			res.on('end', () => resolve({ ws: null, status: res.statusCode ?? 0, body, c: null }));
		});
		ws.once('error', (e) => reject(e));
	});
}

/** Collects a socket's JSON messages; `until` waits for one that matches. */
export function collector(ws: WebSocket) {
	const messages: any[] = [];
	const waiters: { pred: (m: any) => boolean; resolve: (m: any) => void }[] = [];
	ws.on('message', (d) => {
		const m = JSON.parse(d.toString());
		messages.push(m);
		for (const w of [...waiters]) if (w.pred(m)) {
			waiters.splice(waiters.indexOf(w), 1);
			w.resolve(m);
		}
	});
	return {
		messages,
		until(pred: (m: any) => boolean, timeoutMs = 10_000): Promise<any> {
			const found = messages.find(pred);
			if (found) return Promise.resolve(found);
			return new Promise((resolve, reject) => {
				const t = setTimeout(() => reject(new Error(`timed out waiting for a message; got ${JSON.stringify(messages.slice(-3)).slice(0, 500)}`)), timeoutMs);
				waiters.push({ pred, resolve: (m) => (clearTimeout(t), resolve(m)) });
			});
		}
	};
}

export function wsUrl(baseUrl: string, path: string): string {
	return baseUrl.replace(/^http/, 'ws') + path;
}

/** Opens a WebSocket that must be accepted. */
export async function openOk(url: string, headers: Record<string, string>, options: WebSocket.ClientOptions = {}): Promise<{ ws: WebSocket; c: Collector }> {
	const s = await openSocket(url, headers, options);
	if (s.ws === null) throw new Error(`upgrade refused: ${s.status} ${s.body}`);
	return { ws: s.ws, c: s.c };
}
