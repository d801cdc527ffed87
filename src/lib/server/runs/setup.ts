import { z } from 'zod';
import { fixedPoint, type FixedPointId } from '../../metrology/index';
import type { DB } from '../db';
import type { Run, RunKind } from '../db/schema';
import type { SessionUser } from '../auth/types';
import { createRun } from '../repositories/run-lifecycle';

const id = (what: string) => z.coerce.number({ message: `Choose a ${what}.` }).int().positive(`Choose a ${what}.`);
const positive = (what: string, unit: string, max: number) =>
	z.coerce.number({ message: `${what} must be a number in ${unit}.` }).positive(`${what} must be above 0 ${unit}.`).max(max, `${what} above ${max} ${unit} is not plausible.`);

/** The run set-up form, field by field; each message says what is wrong and how to put it right. */
export const runSetupSchema = z.object({
	benchId: id('bench'),
	cellId: id('cell'),
	thermometerId: id('thermometer'),
	resistorId: id('standard resistor'),
	kind: z.enum(['melt', 'freeze', 'triple-point'], { message: 'Choose melt, freeze or triple point.' }),
	sensorDepthMm: positive('Immersion depth', 'mm', 1000),
	gasPressureKPa: positive('Gas pressure', 'kPa', 1000),
	driftLimitMilliKelvinPerHour: positive('Drift limit', 'mK/h', 1000),
	bandMilliKelvin: positive('Band around the expected value', 'mK', 10_000),
	silenceSeconds: positive('Silence limit', 's', 86_400),
	notes: z.string().max(2000, 'Notes are limited to 2000 characters.').default('')
});
export type RunSetupInput = z.infer<typeof runSetupSchema>;

export type SetupOutcome = { ok: true; run: Run } | { ok: false; errors: Record<string, string> };

/** Which kinds make sense at a point: its usual ones, and triple point only at a triple point. */
export function kindsFor(point: FixedPointId): RunKind[] {
	const fp = fixedPoint(point);
	const kinds = new Set<RunKind>(fp.usualKinds);
	if (fp.state === 'triple') kinds.add('triple-point');
	return [...kinds];
}

export async function setUpRun(db: DB, actor: SessionUser, input: RunSetupInput): Promise<SetupOutcome> {
	const [bench, cell, thermometer, resistor] = await Promise.all([
		db.selectFrom('bench').selectAll().where('id', '=', input.benchId).where('retired_at', 'is', null).executeTakeFirst(),
		db.selectFrom('cell').selectAll().where('id', '=', input.cellId).where('retired_at', 'is', null).executeTakeFirst(),
		db.selectFrom('thermometer').selectAll().where('id', '=', input.thermometerId).where('retired_at', 'is', null).executeTakeFirst(),
		db.selectFrom('standard_resistor').selectAll().where('id', '=', input.resistorId).where('retired_at', 'is', null).executeTakeFirst()
	]);
	const errors: Record<string, string> = {};
	if (!bench) errors.benchId = 'That bench does not exist or is retired.';
	if (!cell) errors.cellId = 'That cell does not exist or is retired.';
	if (!thermometer) errors.thermometerId = 'That thermometer does not exist or is retired.';
	if (!resistor) errors.resistorId = 'That standard resistor does not exist or is retired.';
	if (cell && !kindsFor(cell.fixed_point).includes(input.kind)) {
		errors.kind = `A ${fixedPoint(cell.fixed_point).name.toLowerCase()} is realized as ${kindsFor(cell.fixed_point).join(' or ')}, not ${input.kind}.`;
	}
	if (cell && thermometer && cell.fixed_point === 'Ag' && thermometer.kind !== 'HTSPRT') {
		errors.thermometerId = 'The silver point needs a high-temperature SPRT.';
	}
	if (cell && input.sensorDepthMm > cell.immersion_depth_mm + 50) {
		errors.sensorDepthMm = `The sensor cannot sit ${input.sensorDepthMm} mm deep in a cell whose immersion depth is ${cell.immersion_depth_mm} mm.`;
	}
	if (Object.keys(errors).length || !cell) return { ok: false, errors };
	const run = await createRun(db, actor, {
		bench_id: input.benchId,
		cell_id: input.cellId,
		thermometer_id: input.thermometerId,
		resistor_id: input.resistorId,
		fixed_point: cell.fixed_point,
		kind: input.kind,
		operator_id: actor.id,
		sensor_depth_m: input.sensorDepthMm / 1000,
		gas_pressure_pa: input.gasPressureKPa * 1000,
		settings_json: JSON.stringify({
			limits: { driftMilliKelvinPerHour: input.driftLimitMilliKelvinPerHour, bandMilliKelvin: input.bandMilliKelvin, silenceSeconds: input.silenceSeconds }
		}),
		notes: input.notes
	});
	return { ok: true, run };
}
