import type { DB } from '../db';
import type { Auth } from '../auth/better-auth';
import { provisionUser } from '../auth/provision';
import { mulberry32 } from '../../../../bench-simulator/src/prng';
import { seedPastRuns } from './history';
import { putSetting } from '../repositories/settings';
import { recordAudit } from '../repositories/audit';
import { withAluminiumRatio } from '../../metrology/index';
import { DEMO_BENCHES, DEMO_CELLS, DEMO_LAB_NAME, DEMO_RESISTORS, DEMO_THERMOMETERS, DEMO_USERS } from './scenario';

const DAY_MS = 86_400_000;

export interface SeedResult {
	userIds: Record<string, string>;
	benchIds: number[];
	cellIds: Record<string, number>;
	thermometerIds: Record<string, number>;
	resistorIds: Record<string, number>;
}

/** Loads the demo laboratory into an empty, migrated database. */
export async function seedDemo(db: DB, auth: Auth, nowMs = Date.now(), options: { pastRuns?: boolean } = {}): Promise<SeedResult> {
	const existing = await db.selectFrom('bench').select('id').limit(1).executeTakeFirst();
	if (existing) throw new Error('The database already holds a laboratory; the demo seed needs an empty one.');

	const userIds: Record<string, string> = {};
	for (const u of DEMO_USERS) userIds[u.email] = await provisionUser(auth, u);
	await putSetting(db, 'lab.name', DEMO_LAB_NAME);

	const random = mulberry32(20261202);
	const created = nowMs - 3 * 365 * DAY_MS;
	const benchIds: number[] = [];
	for (const b of DEMO_BENCHES) {
		const row = await db.insertInto('bench').values({ ...b, created_at: created, retired_at: null }).returning('id').executeTakeFirstOrThrow();
		benchIds.push(row.id);
	}
	const cellIds: Record<string, number> = {};
	for (const c of DEMO_CELLS) {
		const row = await db.insertInto('cell').values({ ...c, fill_pressure_pa: null, created_at: created, retired_at: null }).returning('id').executeTakeFirstOrThrow();
		cellIds[c.serial] = row.id;
	}
	const resistorIds: Record<string, number> = {};
	for (const r of DEMO_RESISTORS) {
		const row = await db.insertInto('standard_resistor').values({ ...r, calibrated_at: nowMs - 200 * DAY_MS, created_at: created, retired_at: null }).returning('id').executeTakeFirstOrThrow();
		resistorIds[r.serial] = row.id;
	}
	const thermometerIds: Record<string, number> = {};
	for (const t of DEMO_THERMOMETERS) {
		const { r_tpw_ohm, subrange, coefficients, ...rest } = t;
		const row = await db.insertInto('thermometer').values({ ...rest, created_at: created, retired_at: null }).returning('id').executeTakeFirstOrThrow();
		thermometerIds[t.serial] = row.id;
		const k = subrange === 'TPW-Sn-Zn-Al-Ag' ? withAluminiumRatio(coefficients) : coefficients;
		await db
			.insertInto('calibration')
			.values({ thermometer_id: row.id, version: 1, subrange, coefficients_json: JSON.stringify(k), r_tpw_ohm, runs_json: '[]', uncertainty_json: '{}', status: 'current', notes: 'Demo calibration (invented coefficients)', created_by: null, created_at: nowMs - 400 * DAY_MS })
			.execute();
		// A check at the triple point of water about every ten weeks for three years: a slow upward creep
		// (oxidation, a few tenths of a millikelvin equivalent a year) plus measurement scatter.
		const checks = 16;
		for (let i = 0; i < checks; i++) {
			const measuredAt = created + Math.round(((i + 0.5) / checks) * (nowMs - created - 7 * DAY_MS));
			const years = (measuredAt - created) / (365 * DAY_MS);
			const sensitivityOhmPerKelvin = r_tpw_ohm * 3.98853e-3; // ITS-90: dW_r/dT at 273.16 K
			const creepOhm = years * 0.25e-3 * sensitivityOhmPerKelvin;
			const scatterOhm = (random() - 0.5) * 0.06e-3 * sensitivityOhmPerKelvin;
			await db
				.insertInto('thermometer_rtpw')
				.values({ thermometer_id: row.id, measured_at: measuredAt, r_tpw_ohm: r_tpw_ohm - 3 * 0.25e-3 * sensitivityOhmPerKelvin + creepOhm + scatterOhm, current_ma: 1, run_id: null, source: 'entered', note: '', created_by: userIds[DEMO_USERS[0].email], created_at: measuredAt })
				.execute();
		}
	}
	const seeded = { userIds, benchIds, cellIds, thermometerIds, resistorIds };
	if (options.pastRuns !== false) await seedPastRuns(db, seeded, nowMs);
	await recordAudit(db, { actor: { id: null, label: 'demo seed' }, action: 'lab.seed', objectType: 'lab', objectId: 'demo', summary: `Loaded the demo laboratory “${DEMO_LAB_NAME}”`, atMs: nowMs });
	return seeded;
}
