// The engine on simulated realizations (bench-simulator), fed through the real reducer, and the outbox
// delivering to the local fake SMTP server.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createKysely, openSqlite } from '../db';
import { seededDatabase } from '../../../../tests/support/server';
import { simulate } from '../../../../bench-simulator/src/index';
import { demoEquipmentOverrides } from '../demo/history';
import { Reducer } from '../ingest/reducer';
import { startFakeMailServer } from '../mail/fake-server';
import { startOutbox } from '../mail/outbox';
import type { AlertSummary } from '$lib/live/protocol';
import { AlertEngine } from './engine';

async function replay(scenario: string, kind: 'freeze' | 'melt', hours: number, env: NodeJS.ProcessEnv = {}) {
	const { dbPath } = await seededDatabase();
	const sqlite = openSqlite(dbPath);
	const db = createKysely(sqlite);
	const id = async (t: 'bench' | 'cell' | 'thermometer' | 'standard_resistor', c: 'name' | 'serial', v: string) => (await db.selectFrom(t).select('id').where(c, '=', v).executeTakeFirstOrThrow()).id;
	const runId = Number(
		sqlite
			.prepare("insert into run (bench_id, cell_id, thermometer_id, resistor_id, fixed_point, kind, state, created_at, started_at, sensor_depth_m, settings_json) values (?, ?, ?, ?, 'Zn', ?, 'recording', ?, ?, 0.182, ?)")
			.run(await id('bench', 'name', 'Bench 3 · zinc'), await id('cell', 'serial', 'KV-Zn-09'), await id('thermometer', 'serial', 'KV-S-5182'), await id('standard_resistor', 'serial', 'KV-R25-01'), kind, Date.now(), Date.now(), JSON.stringify({ limits: { driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 10, silenceSeconds: 600 } })).lastInsertRowid
	);
	const sim = simulate(scenario, { ...demoEquipmentOverrides('KV-S-5182', 'KV-R25-01', 'KV-Zn-09'), readingIntervalS: 5, epochMs: 0, durationHours: hours }, 1);
	const seen: AlertSummary[] = [];
	const engine = new AlertEngine(sqlite, { manual: true, env, publisher: { publishAlert: (a) => seen.push(a) } });
	const reducer = new Reducer(sqlite, (u) => engine.observe(u));
	const ins = sqlite.prepare('insert into reading values (?, ?, ?, ?, ?, ?)');
	const at: { kind: string; state: string; simMinutes: number }[] = [];
	for (let i = 0; i < sim.readings.length; i += 12) {
		const chunk = sim.readings.slice(i, i + 12);
		sqlite.transaction(() => {
			for (const r of chunk) ins.run(runId, r.seq, r.timeMs, r.ratio, r.currentMilliAmp, r.channel ?? 1);
		})();
		sqlite.prepare('update run set last_reading_at = ?, highest_seq = ?, reading_count = ? where id = ?').run(Date.now(), chunk.at(-1)!.seq, i + chunk.length, runId);
		const before = seen.length;
		reducer.notify(runId);
		reducer.pump();
		for (const a of seen.slice(before)) at.push({ kind: a.kind, state: a.state, simMinutes: chunk.at(-1)!.timeMs / 60_000 });
	}
	return { sqlite, db, runId, seen, at, engine, dbPath, lostMs: sim.truth.faults.furnaceControlLostMs };
}

describe('alert engine on simulated runs', () => {
	it('zn-freeze-drift: the drift rule fires within the window after control is lost, then clears by itself', async () => {
		const r = await replay('zn-freeze-drift', 'freeze', 2.6);
		const raised = r.at.filter((a) => a.kind === 'drift' && a.state === 'raised');
		expect(raised.length).toBe(1);
		const lostMin = r.lostMs! / 60_000;
		// fit window 15 min, sustain 10 min: within half an hour of the fault
		expect(raised[0].simMinutes).toBeGreaterThan(lostMin);
		expect(raised[0].simMinutes).toBeLessThan(lostMin + 30);
		expect(r.at.some((a) => a.kind === 'drift' && a.state === 'cleared')).toBe(true);
		const rows = await r.db.selectFrom('alert_event').selectAll().where('run_id', '=', r.runId).execute();
		expect(rows.map((x) => x.kind)).toEqual(['drift']);
		expect(rows[0]).toMatchObject({ state: 'cleared', cleared_by_condition: 1, occurrences: 1, unit: 'mK/h', limit_value: 0.5 });
		const audit = await r.db.selectFrom('audit_log').select('action').where('object_type', '=', 'alert').execute();
		expect(audit.map((a) => a.action)).toEqual(['alert.raise', 'alert.clear']);
		// one e-mail queued, to the supervisors (no technician on this run)
		const mail = await r.db.selectFrom('alert_delivery').selectAll().execute();
		expect(mail.length).toBe(1);
		expect(JSON.parse(mail[0].recipients_json)).toEqual(['ruth.adeyemi@kestrelvale.example']);
	}, 120_000);

	it('a plain zinc freeze, its natural end included, raises nothing', async () => {
		const r = await replay('zn-freeze', 'freeze', 12);
		expect(r.at).toEqual([]);
	}, 120_000);

	it('silence: the tick raises it past the limit and clears it when readings come back; the outbox delivers it', async () => {
		const dir = mkdtempSync(join(tmpdir(), 'stillpoint-mail-'));
		const fake = await startFakeMailServer({ store: join(dir, 'mail.jsonl') });
		const env = { STILLPOINT_SMTP_URL: `smtp://127.0.0.1:${fake.port}`, STILLPOINT_PUBLIC_URL: 'http://lab.example' };
		const r = await replay('zn-freeze', 'freeze', 0.2, env);
		const now = Date.now();
		r.engine.tick(now + 599_000);
		expect(r.seen.filter((a) => a.kind === 'silence')).toEqual([]);
		r.engine.tick(now + 700_000);
		expect(r.seen.at(-1)).toMatchObject({ kind: 'silence', state: 'raised', limitValue: 600, unit: 's' });
		const outbox = startOutbox(r.sqlite, { env, intervalMs: 60_000 });
		await outbox.pump(now + 700_000);
		expect(await r.db.selectFrom('alert_delivery').select(['state', 'last_error']).execute()).toEqual([{ state: 'sent', last_error: null }]);
		const [m] = await fake.waitFor(1);
		expect(m.subject).toContain('Instrument silent');
		expect(m.text).toContain(`http://lab.example/alerts?alert=${r.seen.at(-1)!.id}`);
		expect(m.text).toContain('Limit:      600 s');
		// not acknowledged within 15 min (the default): to the escalation list (the admins while it is empty)
		r.engine.tick(now + 700_000 + 14 * 60_000);
		expect(r.seen.at(-1)!.escalatedAtMs).toBeNull();
		r.engine.tick(now + 700_000 + 15 * 60_000 + 1000);
		expect(r.seen.at(-1)!.escalatedAtMs).toBe(now + 700_000 + 15 * 60_000 + 1000);
		const esc = await r.db.selectFrom('alert_delivery').select(['reason', 'recipients_json', 'subject']).where('reason', '=', 'escalated').execute();
		expect(esc.map((e) => [JSON.parse(e.recipients_json), e.subject.startsWith('[Stillpoint, not yet acknowledged]')])).toEqual([[['priya.rao@kestrelvale.example'], true]]);
		r.engine.tick(now + 700_000 + 40 * 60_000);
		expect((await r.db.selectFrom('alert_delivery').select('id').where('reason', '=', 'escalated').execute()).length).toBe(1);
		r.sqlite.prepare('update run set last_reading_at = ? where id = ?').run(now + 700_000 + 40 * 60_000, r.runId);
		r.engine.tick(now + 700_000 + 40 * 60_000 + 500);
		expect(r.seen.at(-1)).toMatchObject({ kind: 'silence', state: 'cleared' });
		outbox.close();
		await fake.close();
	}, 120_000);
});
