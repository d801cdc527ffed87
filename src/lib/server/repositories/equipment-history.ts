import { z } from 'zod';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from './audit';
import { getSetting } from './settings';
import { DEFAULT_RTPW_LIMIT_MILLIKELVIN, rtpwEquivalentMilliKelvin } from '../../history/rtpw';

// One thermometer or cell with its history: for the detail pages of the engineer's bench.

export function getThermometer(db: DB, id: number) {
	return db.selectFrom('thermometer').selectAll().where('id', '=', id).executeTakeFirst();
}

export function getCell(db: DB, id: number) {
	return db.selectFrom('cell').selectAll().where('id', '=', id).executeTakeFirst();
}

/** The lab's R_TPW repeatability limit, mK equivalent ('limits.rtpwShiftMilliKelvin', default 0.2 mK). */
export async function rtpwLimitMilliKelvin(db: DB): Promise<number> {
	const v = await getSetting<unknown>(db, 'limits.rtpwShiftMilliKelvin', DEFAULT_RTPW_LIMIT_MILLIKELVIN);
	return typeof v === 'number' && v > 0 ? v : DEFAULT_RTPW_LIMIT_MILLIKELVIN;
}

export async function currentCalibration(db: DB, thermometerId: number) {
	const row = await db.selectFrom('calibration').selectAll().where('thermometer_id', '=', thermometerId).where('status', '=', 'current').orderBy('version', 'desc').executeTakeFirst();
	return row ? { ...row, coefficients: JSON.parse(row.coefficients_json) as Record<string, number> } : null;
}

function runsQuery(db: DB) {
	return db
		.selectFrom('run')
		.innerJoin('bench', 'bench.id', 'run.bench_id')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.select(['run.id', 'run.fixed_point', 'run.kind', 'run.state', 'run.review_state', 'run.started_at', 'run.ended_at', 'run.reading_count', 'bench.name as bench_name', 'cell.serial as cell_serial', 'thermometer.serial as thermometer_serial'])
		.orderBy('run.created_at', 'desc')
		.limit(200);
}

export function runsOfThermometer(db: DB, thermometerId: number) {
	return runsQuery(db).where('run.thermometer_id', '=', thermometerId).execute();
}

export function runsOfCell(db: DB, cellId: number) {
	return runsQuery(db).where('run.cell_id', '=', cellId).execute();
}

export function rtpwChecks(db: DB, thermometerId: number) {
	return db
		.selectFrom('thermometer_rtpw')
		.leftJoin('user', 'user.id', 'thermometer_rtpw.created_by')
		.select(['thermometer_rtpw.id', 'thermometer_rtpw.measured_at', 'thermometer_rtpw.r_tpw_ohm', 'thermometer_rtpw.current_ma', 'thermometer_rtpw.run_id', 'thermometer_rtpw.source', 'thermometer_rtpw.note', 'user.name as created_by_name'])
		.where('thermometer_rtpw.thermometer_id', '=', thermometerId)
		.orderBy('thermometer_rtpw.measured_at')
		.execute();
}

const UTC_MINUTE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/;

export const rtpwCheckSchema = z.object({
	measuredAt: z
		.string()
		.regex(UTC_MINUTE, 'Give the time as YYYY-MM-DDThh:mm (UTC)')
		.transform((s) => Date.parse(`${s}:00Z`))
		.refine((ms) => Number.isFinite(ms), 'Not a real date')
		.refine((ms) => ms <= Date.now() + 5 * 60_000, 'A check cannot be in the future'),
	rTpwOhm: z.coerce.number().positive('R_TPW must be positive').max(1000, 'R_TPW above 1000 Ω is not an SPRT'),
	currentMilliAmpere: z
		.union([z.literal('').transform(() => null), z.coerce.number().positive().max(50, 'Current above 50 mA is not plausible')])
		.nullable()
		.default(null),
	note: z.string().trim().max(500).default('')
});
export type RtpwCheckInput = z.infer<typeof rtpwCheckSchema>;

export async function addRtpwCheck(db: DB, actor: SessionUser, thermometer: { id: number; serial: string }, input: RtpwCheckInput) {
	return db.transaction().execute(async (tx) => {
		const previous = await tx.selectFrom('thermometer_rtpw').select('r_tpw_ohm').where('thermometer_id', '=', thermometer.id).where('measured_at', '<=', input.measuredAt).orderBy('measured_at', 'desc').executeTakeFirst();
		const previousOhm = previous?.r_tpw_ohm ?? null;
		const row = await tx
			.insertInto('thermometer_rtpw')
			.values({ thermometer_id: thermometer.id, measured_at: input.measuredAt, r_tpw_ohm: input.rTpwOhm, current_ma: input.currentMilliAmpere, run_id: null, source: 'entered', note: input.note, created_by: actor.id, created_at: Date.now() })
			.returningAll()
			.executeTakeFirstOrThrow();
		const shift = previousOhm === null ? null : rtpwEquivalentMilliKelvin(input.rTpwOhm - previousOhm, previousOhm);
		await recordAudit(tx, {
			actor,
			action: 'thermometer.rtpw.add',
			objectType: 'thermometer',
			objectId: thermometer.id,
			summary: `R_TPW check on ${thermometer.serial}: ${input.rTpwOhm} Ω at ${new Date(input.measuredAt).toISOString().slice(0, 16)} UTC${shift === null ? '' : ` (${shift >= 0 ? '+' : ''}${shift.toFixed(3)} mK from the previous check)`}`,
			details: { checkId: row.id, ...input, shiftMilliKelvin: shift }
		});
		return row;
	});
}
