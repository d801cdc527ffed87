import { sql, type Kysely } from 'kysely';

// Calibrations from stored runs, and immersion tests.
// Frozen in time: this file takes Kysely<any> and imports no application code.
const statements = [
	// An immersion-step event (the thermometer raised or lowered in its well) carries the depth of the
	// sensor's mid-point below the free surface of the metal after the step, in metres.
	`alter table run_event add column depth_m real check (depth_m is null or (depth_m >= 0 and depth_m <= 2))`,
	// At most one current calibration per thermometer: a new version supersedes the old one in the
	// same transaction, and the database refuses a second 'current' row.
	`create unique index calibration_one_current on calibration (thermometer_id) where status = 'current'`
];

export async function up(db: Kysely<any>): Promise<void> {
	for (const s of statements) await sql.raw(s).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await sql.raw('drop index if exists calibration_one_current').execute(db);
	await sql.raw('alter table run_event drop column depth_m').execute(db);
}
