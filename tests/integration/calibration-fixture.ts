// A test laboratory for the calibration tests: the demo users and cells, plus a thermometer and a 25 Ω
// standard resistor with no temperature coefficients, and freeze runs synthesised reading by reading so
// that their plateaux sit at exactly the resistance a test asks for.
import type SQLite from 'better-sqlite3';
import type { Kysely } from 'kysely';
import { createKysely, openSqlite } from '../../src/lib/server/db/index';
import type { Database, FixedPointCode } from '../../src/lib/server/db/schema';
import type { SessionUser } from '../../src/lib/server/auth/types';
import { referenceRatioDerivative, fixedPoint } from '../../src/lib/metrology/index';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { seededDatabase } from '../support/server';

export const RESISTOR_OHM = 25;
const DAY_MS = 86_400_000;

export interface CalLab {
	db: Kysely<Database>;
	sqlite: SQLite.Database;
	engineer: SessionUser;
	thermometerId: number;
	cellIds: Record<string, number>;
	benchId: number;
	resistorId: number;
	/** inserts a finished (and by default signed-off) freeze run whose plateau reads resistanceOhm at zero current */
	freezeRun(point: FixedPointCode, resistanceOhm: number, opts?: { startMs?: number; signed?: boolean; rTpwOhm?: number; depthMetre?: number }): Promise<number>;
	close(): Promise<void>;
}

export async function calibrationLab(rTpwOhm: number, serial = 'TEST-SPRT-1'): Promise<CalLab> {
	const { dbPath, seed } = await seededDatabase();
	const sqlite = openSqlite(dbPath);
	const db = createKysely(sqlite);
	const u = DEMO_USERS.find((x) => x.role === 'engineer')!;
	const engineer: SessionUser = { id: seed.userIds[u.email], email: u.email, name: u.name, role: 'engineer' };
	const now = Date.now();
	const thermometer = await db.insertInto('thermometer').values({ serial, kind: 'SPRT', maker: 'test', nominal_ohm: 25.5, notes: '', created_at: now - 400 * DAY_MS, retired_at: null }).returning('id').executeTakeFirstOrThrow();
	await db.insertInto('thermometer_rtpw').values({ thermometer_id: thermometer.id, measured_at: now - 30 * DAY_MS, r_tpw_ohm: rTpwOhm, current_ma: 1, run_id: null, source: 'entered', note: '', created_by: engineer.id, created_at: now - 30 * DAY_MS }).execute();
	const resistor = await db
		.insertInto('standard_resistor')
		.values({ serial: `R25-${serial}`, nominal_ohm: RESISTOR_OHM, calibrated_ohm: RESISTOR_OHM, calibrated_at: now - 100 * DAY_MS, reference_temperature_c: 20, alpha_per_k: 0, beta_per_k2: 0, bath_temperature_c: 20, notes: '', created_at: now - 400 * DAY_MS, retired_at: null })
		.returning('id')
		.executeTakeFirstOrThrow();
	return {
		db,
		sqlite,
		engineer,
		thermometerId: thermometer.id,
		cellIds: seed.cellIds,
		benchId: seed.benchIds[1],
		resistorId: resistor.id,
		async freezeRun(point, resistanceOhm, opts = {}) {
			const cellSerial = { Sn: 'KV-Sn-11', Zn: 'KV-Zn-05', In: 'KV-In-03', Al: 'KV-Al-02' }[point as string] ?? '';
			const cellId = seed.cellIds[cellSerial];
			const startMs = opts.startMs ?? now - 20 * DAY_MS;
			const rTpw = opts.rTpwOhm ?? rTpwOhm;
			// A sensor reading ΔT above the plateau reads ΔR = R_TPW · dW_r/dT · ΔT higher (first order is plenty for the approach).
			const ohmPerKelvin = rTpw * referenceRatioDerivative(fixedPoint(point).t90);
			const intervalS = 10;
			const readings: { seq: number; time_ms: number; ratio: number; current_ma: number; channel: number }[] = [];
			const approachS = 40 * 60;
			const flatS = 6 * 3600;
			const fallS = 60 * 60;
			for (let seq = 0, t = 0; t <= approachS + flatS + fallS; seq++, t += intervalS) {
				let excessK = 0;
				if (t < approachS) excessK = 0.2 * (1 - t / approachS);
				else if (t > approachS + flatS) excessK = (-2 * (t - approachS - flatS)) / 3600;
				// ±1.25 µK of alternating scatter, so the fits see noise but the plateau mean stays exact
				const scatterOhm = (seq % 2 === 0 ? 1 : -1) * 1.25e-6 * ohmPerKelvin;
				const r = resistanceOhm + excessK * ohmPerKelvin + (t >= approachS && t <= approachS + flatS ? scatterOhm : 0);
				readings.push({ seq, time_ms: startMs + t * 1000, ratio: r / RESISTOR_OHM, current_ma: 1, channel: 1 });
			}
			const last = readings.at(-1)!;
			const run = await db
				.insertInto('run')
				.values({
					bench_id: seed.benchIds[1],
					cell_id: cellId,
					thermometer_id: thermometer.id,
					resistor_id: resistor.id,
					fixed_point: point,
					kind: 'freeze',
					state: 'finished',
					review_state: opts.signed === false ? 'unreviewed' : 'signed',
					operator_id: engineer.id,
					created_by: engineer.id,
					created_at: startMs - 60_000,
					started_at: startMs,
					ended_at: last.time_ms,
					sensor_depth_m: opts.depthMetre ?? 0,
					gas_pressure_pa: 101_325,
					signed_by: opts.signed === false ? null : engineer.id,
					signed_at: opts.signed === false ? null : last.time_ms + 3_600_000,
					reading_count: readings.length,
					highest_seq: last.seq,
					last_reading_at: last.time_ms
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			for (let k = 0; k < readings.length; k += 500) await db.insertInto('reading').values(readings.slice(k, k + 500).map((r) => ({ ...r, run_id: run.id }))).execute();
			return run.id;
		},
		async close() {
			await db.destroy();
		}
	};
}
