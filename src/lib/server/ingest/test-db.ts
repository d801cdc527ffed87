// For unit tests beside the ingest code: a migrated SQLite file with one bench, cell, thermometer
// (with an R_TPW check and optionally a calibration), resistor and a run in the given state.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type SQLite from 'better-sqlite3';
import { createKysely, migrateToLatest, openSqlite } from '../db';

export async function ingestTestDb(opts: { state?: string; calibrated?: boolean } = {}): Promise<{ sqlite: SQLite.Database; path: string; runId: number; makeRun: (state: string) => number }> {
	const path = join(mkdtempSync(join(tmpdir(), 'stillpoint-unit-')), 'unit.db');
	const sqlite = openSqlite(path);
	await migrateToLatest(createKysely(sqlite));
	const now = Date.now();
	sqlite.prepare("insert into bench (id, name, heat_source_kind, created_at) values (1, 'B1', 'bath', ?), (2, 'B2', 'bath', ?)").run(now, now);
	sqlite.prepare("insert into cell (id, serial, fixed_point, immersion_depth_mm, created_at) values (1, 'C-Ga', 'Ga', 160, ?)").run(now);
	sqlite.prepare("insert into thermometer (id, serial, nominal_ohm, created_at) values (1, 'T1', 25.5, ?)").run(now);
	sqlite.prepare('insert into thermometer_rtpw (thermometer_id, measured_at, r_tpw_ohm, created_at) values (1, ?, 25.5483, ?)').run(now - 86_400_000, now);
	if (opts.calibrated !== false) {
		sqlite.prepare("insert into calibration (thermometer_id, version, subrange, coefficients_json, r_tpw_ohm, created_at) values (1, 1, 'TPW-Sn-Zn', ?, 25.5483, ?)").run(JSON.stringify({ a: -1.1873e-4, b: -1.0215e-5 }), now);
	}
	sqlite.prepare("insert into standard_resistor (id, serial, nominal_ohm, calibrated_ohm, created_at) values (1, 'R25', 25, 24.9999871, ?)").run(now);
	let bench = 0;
	const makeRun = (state: string) =>
		Number(sqlite.prepare("insert into run (bench_id, cell_id, thermometer_id, resistor_id, fixed_point, kind, state, created_at) values (?, 1, 1, 1, 'Ga', 'melt', ?, ?)").run((bench++ % 2) + 1, state, now).lastInsertRowid);
	const runId = makeRun(opts.state ?? 'recording');
	return { sqlite, path, runId, makeRun };
}
