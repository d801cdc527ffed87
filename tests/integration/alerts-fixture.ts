// Shared set-up of the alert tests: the local fake SMTP server, a seeded database, the real server
// pointed at the fake, and runs set up on the zinc bench with the equipment the simulator mirrors.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Kysely } from 'kysely';
import { createKysely, openSqlite } from '../../src/lib/server/db/index';
import type { Database, RunKind } from '../../src/lib/server/db/schema';
import type { SessionUser } from '../../src/lib/server/auth/types';
import { createRun, transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { createBenchToken } from '../../src/lib/server/tokens/index';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { demoEquipmentOverrides } from '../../src/lib/server/demo/history';
import { simulate, type SimReading } from '../../bench-simulator/src/index';
import { startFakeMailServer, type FakeMailServer } from '../../src/lib/server/mail/fake-server';
import { seededDatabase, signInCookie, startTestServer, type TestServer } from '../support/server';

export interface AlertFixture {
	server: TestServer;
	mail: FakeMailServer;
	db: Kysely<Database>;
	people: Record<'technician' | 'supervisor' | 'engineer' | 'admin', SessionUser>;
	cookie(role: 'technician' | 'supervisor' | 'engineer' | 'admin'): Promise<string>;
	/** a recording zinc run on Bench 3 with these set-up limits, operated by the technician, and a token */
	zincRun(limits: { driftMilliKelvinPerHour: number; bandMilliKelvin: number; silenceSeconds: number }, kind?: RunKind): Promise<{ runId: number; token: string }>;
	close(): Promise<void>;
}

export async function alertFixture(opts: { env?: Record<string, string>; dbPath?: string } = {}): Promise<AlertFixture> {
	const dir = mkdtempSync(join(tmpdir(), 'stillpoint-alerts-'));
	const store = join(dir, 'mail.jsonl');
	const mail = await startFakeMailServer({ store });
	const dbPath = opts.dbPath ?? (await seededDatabase(join(dir, 'alerts.db'))).dbPath;
	const db = createKysely(openSqlite(dbPath));
	const users = await db.selectFrom('user').select(['id', 'email', 'name', 'role']).execute();
	const person = (role: string): SessionUser => {
		const u = users.find((x) => x.role === role)!;
		return { id: u.id, email: u.email, name: u.name, role: role as SessionUser['role'] };
	};
	const server = await startTestServer({
		dbPath,
		env: { STILLPOINT_SMTP_URL: `smtp://127.0.0.1:${mail.port}`, STILLPOINT_FAKE_MAIL_STORE: store, STILLPOINT_PUBLIC_URL: 'http://stillpoint.kestrelvale.example', STILLPOINT_ALERT_TICK_MS: '250', ...opts.env }
	});
	const people = { technician: person('technician'), supervisor: person('supervisor'), engineer: person('engineer'), admin: person('admin') };
	const id = async (t: 'bench' | 'cell' | 'thermometer' | 'standard_resistor', c: 'name' | 'serial', v: string) => (await db.selectFrom(t).select('id').where(c, '=', v).executeTakeFirstOrThrow()).id;
	return {
		server,
		mail,
		db,
		people,
		cookie(role) {
			const u = DEMO_USERS.find((x) => x.role === role)!;
			return signInCookie(server.baseUrl, u.email, u.password);
		},
		async zincRun(limits, kind = 'freeze') {
			const benchId = await id('bench', 'name', 'Bench 3 · zinc');
			for (const b of await db.selectFrom('run').select('id').where('bench_id', '=', benchId).where('state', '=', 'recording').execute()) await transitionRun(db, people.admin, b.id, 'finish');
			const run = await createRun(db, people.technician, {
				bench_id: benchId,
				cell_id: await id('cell', 'serial', 'KV-Zn-09'),
				thermometer_id: await id('thermometer', 'serial', 'KV-S-5182'),
				resistor_id: await id('standard_resistor', 'serial', 'KV-R25-01'),
				fixed_point: 'Zn',
				kind,
				operator_id: people.technician.id,
				sensor_depth_m: 0.182,
				settings_json: JSON.stringify({ limits })
			});
			await transitionRun(db, people.technician, run.id, 'start');
			const t = await createBenchToken(db, people.admin, benchId, 'alerts test');
			return { runId: run.id, token: t.token };
		},
		async close() {
			await server.stop();
			await mail.close();
			await db.destroy();
		}
	};
}

/** The simulated zinc freeze whose furnace control is lost at 2 h, on the seeded equipment. */
export function driftReadings(hours = 2.6): { readings: SimReading[]; lostMs: number } {
	const sim = simulate('zn-freeze-drift', { ...demoEquipmentOverrides('KV-S-5182', 'KV-R25-01', 'KV-Zn-09'), readingIntervalS: 5, epochMs: Date.now() - 4 * 3600_000, durationHours: hours }, 1);
	return { readings: sim.readings, lostMs: sim.truth.faults.furnaceControlLostMs! };
}

export async function postReadings(baseUrl: string, runId: number, token: string, readings: SimReading[], batch = 300): Promise<void> {
	for (let i = 0; i < readings.length; i += batch) {
		const res = await fetch(`${baseUrl}/api/v1/runs/${runId}/readings`, {
			method: 'POST',
			headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
			body: JSON.stringify({ readings: readings.slice(i, i + batch).map((r) => ({ seq: r.seq, timeMs: r.timeMs, ratio: r.ratio, currentMilliAmp: r.currentMilliAmp, channel: r.channel ?? 1 })) })
		});
		if (res.status !== 200) throw new Error(`readings refused: ${res.status} ${await res.text()}`);
	}
}

export async function waitUntil<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs = 30_000): Promise<T> {
	const end = Date.now() + timeoutMs;
	for (;;) {
		const v = await fn();
		if (v) return v;
		if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
		await new Promise((r) => setTimeout(r, 100));
	}
}
