// A long finished run written straight into a test database (better-sqlite3, 10^4-row transactions):
// an indium freeze shaped plateau with self-heating steps and bridge noise, for the bench-screen
// benchmark. The shape is compressed to the reading count (a 10^6-reading run is not a real freeze).
import Database from 'better-sqlite3';
import { expectedSensorKelvin, ratioFromTemperature, standardResistorOhm, type SubrangeId } from '../../src/lib/metrology/index';
import { DEMO_CELLS, DEMO_RESISTORS, DEMO_THERMOMETERS } from '../../src/lib/server/demo/scenario';

export interface LongRunOptions {
	readings: number;
	intervalMs?: number;
	startMs?: number;
	benchName?: string;
}

/** Inserts a finished indium run with `readings` readings; returns its id. */
export function insertLongRun(dbPath: string, o: LongRunOptions): number {
	const sqlite = new Database(dbPath);
	sqlite.pragma('journal_mode = WAL');
	sqlite.pragma('synchronous = NORMAL');
	const interval = o.intervalMs ?? 1000;
	const startMs = o.startMs ?? Date.now() - o.readings * interval - 3_600_000;
	const cellSerial = 'KV-In-03';
	const thermo = DEMO_THERMOMETERS.find((t) => t.serial === 'KV-S-4471')!;
	const res = DEMO_RESISTORS.find((r) => r.serial === 'KV-R25-01')!;
	const cell = DEMO_CELLS.find((c) => c.serial === cellSerial)!;
	const id = (sql: string, v: string) => (sqlite.prepare(sql).get(v) as { id: number }).id;
	const benchId = id('select id from bench where name = ?', o.benchName ?? 'Bench 2 · indium and tin');
	const cellId = id('select id from cell where serial = ?', cellSerial);
	const thermoId = id('select id from thermometer where serial = ?', thermo.serial);
	const resId = id('select id from standard_resistor where serial = ?', res.serial);
	const depth = cell.immersion_depth_mm / 1000;
	const expected = expectedSensorKelvin('In', { depthMetre: depth, pressurePa: 101_325 });
	const rs = standardResistorOhm({ calibratedOhm: res.calibrated_ohm, referenceTemperatureCelsius: res.reference_temperature_c, alphaPerKelvin: res.alpha_per_k, betaPerKelvin2: res.beta_per_k2 }, res.bath_temperature_c);
	const coeff = { c: 0, d: 0, wAl: 1e9, ...thermo.coefficients };
	const w0 = ratioFromTemperature(expected, thermo.subrange as SubrangeId, coeff);
	const dWdT = (ratioFromTemperature(expected + 0.01, thermo.subrange as SubrangeId, coeff) - w0) / 0.01;
	const n = o.readings;
	const endMs = startMs + (n - 1) * interval;
	const run = sqlite
		.prepare(
			`insert into run (bench_id, cell_id, thermometer_id, resistor_id, fixed_point, kind, state, review_state, created_at, started_at, ended_at,
			   sensor_depth_m, gas_pressure_pa, settings_json, reading_count, highest_seq, last_reading_at, notes)
			 values (?, ?, ?, ?, 'In', 'freeze', 'finished', 'unreviewed', ?, ?, ?, ?, 101325, '{}', ?, ?, ?, ?)`
		)
		.run(benchId, cellId, thermoId, resId, startMs - 60_000, startMs, endMs, depth, n, n - 1, endMs, `Benchmark: ${n} synthetic readings`);
	const runId = Number(run.lastInsertRowid);
	const insert = sqlite.prepare('insert into reading (run_id, seq, time_ms, ratio, current_ma, channel) values (?, ?, ?, ?, ?, 2)');
	let seed = 12345;
	const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
	const gauss = () => Math.sqrt(-2 * Math.log(rand() + 1e-12)) * Math.cos(2 * Math.PI * rand());
	const kSelfHeating = 0.6e-3; // K per mA²
	const batch = sqlite.transaction((from: number, to: number) => {
		for (let i = from; i < to; i++) {
			const f = i / n;
			// approach (0–8 %), undercool and rebound (8–10 %), plateau with a 1/F-shaped tail (10–85 %), then the fall
			let dK: number;
			if (f < 0.08) dK = 2 - 2.4 * (f / 0.08);
			else if (f < 0.1) dK = -0.4 + 0.4 * ((f - 0.08) / 0.02);
			else if (f < 0.85) {
				const frozen = (f - 0.1) / 0.75;
				dK = -0.00002 / Math.max(1 - frozen, 0.05) + 0.00002;
			} else dK = -0.001 - 1.5 * ((f - 0.85) / 0.15);
			const high = Math.floor(i / Math.max(1, Math.floor(n / 40))) % 10 === 3;
			const current = high ? 1.414 : 1;
			const kelvin = expected + dK + kSelfHeating * current * current + 25e-6 * gauss();
			const w = w0 + dWdT * (kelvin - expected);
			insert.run(runId, i, startMs + i * interval, Number(((w * thermo.r_tpw_ohm) / rs).toPrecision(9)), current);
		}
	});
	for (let k = 0; k < n; k += 10_000) batch(k, Math.min(n, k + 10_000));
	sqlite.close();
	return runId;
}
