import type { DB } from '../db';

// Benches, cells, thermometers and standard resistors: the lab's equipment, read by many pages.

export function listBenches(db: DB) {
	return db.selectFrom('bench').selectAll().where('retired_at', 'is', null).orderBy('name').execute();
}

export function listCells(db: DB) {
	return db.selectFrom('cell').selectAll().orderBy('fixed_point').orderBy('serial').execute();
}

export function listThermometers(db: DB) {
	return db.selectFrom('thermometer').selectAll().orderBy('serial').execute();
}

export function listResistors(db: DB) {
	return db.selectFrom('standard_resistor').selectAll().orderBy('serial').execute();
}

/** R_TPW history of one thermometer, oldest first. */
export function rtpwHistory(db: DB, thermometerId: number) {
	return db.selectFrom('thermometer_rtpw').selectAll().where('thermometer_id', '=', thermometerId).orderBy('measured_at').execute();
}

/** The latest R_TPW of every thermometer, for lists. */
export async function latestRtpwByThermometer(db: DB): Promise<Map<number, { r_tpw_ohm: number; measured_at: number; count: number }>> {
	const rows = await db.selectFrom('thermometer_rtpw').select(['thermometer_id', 'r_tpw_ohm', 'measured_at']).orderBy('measured_at').execute();
	const out = new Map<number, { r_tpw_ohm: number; measured_at: number; count: number }>();
	for (const r of rows) {
		const prev = out.get(r.thermometer_id);
		out.set(r.thermometer_id, { r_tpw_ohm: r.r_tpw_ohm, measured_at: r.measured_at, count: (prev?.count ?? 0) + 1 });
	}
	return out;
}

/** Each thermometer's current calibration (sub-range and deviation coefficients), if it has one. */
export async function currentCalibrations(db: DB) {
	const rows = await db
		.selectFrom('calibration')
		.innerJoin('thermometer', 'thermometer.id', 'calibration.thermometer_id')
		.select(['calibration.id', 'calibration.thermometer_id', 'calibration.version', 'calibration.subrange', 'calibration.coefficients_json', 'calibration.r_tpw_ohm', 'calibration.created_at', 'thermometer.serial'])
		.where('calibration.status', '=', 'current')
		.orderBy('thermometer.serial')
		.execute();
	return rows.map(({ coefficients_json, ...r }) => ({ ...r, coefficients: JSON.parse(coefficients_json) as Record<string, number> }));
}
