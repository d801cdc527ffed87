// An SPRT calibration from stored runs: which runs to use, the preview the engineer confirms, and the new
// version stored in `calibration` (the previous current one superseded), audit-logged. Reduction reads
// the current version (ingest/reduce.ts), so every reading reduced afterwards goes through it.
import type SQLite from 'better-sqlite3';
import { fixedPoint, SUBRANGE_IDS, subrange as subrangeOf, type DeviationCoefficients, type FixedPointId, type SubrangeId } from '../../metrology/index';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from '../repositories/audit';
import { getSetting } from '../repositories/settings';
import { calibrationTable, deviationCurve, fitCalibration, propagate, residualsOf, uW, COVERAGE_FACTOR, type CalibrationInput, type Residual, type TableRow } from './maths';
import { measuredPoint, type MeasuredResult } from './measured';

export interface App {
	db: DB;
	sqlite: SQLite.Database;
}

export const DEFAULT_TPW_UNCERTAINTY_MILLIKELVIN = 0.05;
export const TABLE_STEPS_CELSIUS = [1, 5, 10, 25, 50] as const;

export const CORRELATION_NOTE =
	'The fixed-point values come from separate cells and runs and are taken as uncorrelated; each point’s u(W) is moved through a refit of the coefficients to give its share of u(T) across the range. The TPW share enters once, through R_TPW, which scales every calibration W together. Components add in quadrature; expanded with k = 2.';

export function isSubrangeId(v: unknown): v is SubrangeId {
	return typeof v === 'string' && (SUBRANGE_IDS as readonly string[]).includes(v);
}

/** Lab setting 'calibration.tpwUncertaintyMilliKelvin': standard uncertainty of the TPW realization behind R_TPW. */
export async function tpwUncertaintyMilliKelvin(db: DB): Promise<number> {
	const v = await getSetting<unknown>(db, 'calibration.tpwUncertaintyMilliKelvin', DEFAULT_TPW_UNCERTAINTY_MILLIKELVIN);
	return typeof v === 'number' && v >= 0 ? v : DEFAULT_TPW_UNCERTAINTY_MILLIKELVIN;
}

export interface Candidate {
	runId: number;
	point: FixedPointId;
	kind: string;
	cellSerial: string;
	startedAt: number | null;
	endedAt: number | null;
}

export function listThermometers(db: DB) {
	return db
		.selectFrom('thermometer')
		.leftJoin('calibration', (j) => j.onRef('calibration.thermometer_id', '=', 'thermometer.id').on('calibration.status', '=', 'current'))
		.select(['thermometer.id', 'thermometer.serial', 'thermometer.kind', 'calibration.subrange', 'calibration.version', 'calibration.created_at as calibrated_at'])
		.where('thermometer.retired_at', 'is', null)
		.orderBy('thermometer.serial')
		.execute();
}

/** Finished, signed-off runs of the thermometer at each point the sub-range needs (newest first). */
export async function candidates(db: DB, thermometerId: number, subrangeId: SubrangeId): Promise<Record<string, Candidate[]>> {
	const needed = subrangeOf(subrangeId).points.filter((p) => p !== 'TPW');
	const rows = await db
		.selectFrom('run')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.select(['run.id as runId', 'run.fixed_point as point', 'run.kind', 'cell.serial as cellSerial', 'run.started_at as startedAt', 'run.ended_at as endedAt'])
		.where('run.thermometer_id', '=', thermometerId)
		.where('run.state', '=', 'finished')
		.where('run.review_state', '=', 'signed')
		.where('run.fixed_point', 'in', needed)
		.orderBy('run.started_at', 'desc')
		.execute();
	return Object.fromEntries(needed.map((p) => [p, rows.filter((r) => r.point === p)]));
}

export interface PreviewPoint {
	point: FixedPointId;
	options: Candidate[];
	run: Candidate | null;
	measured: MeasuredResult | null;
	uW: number | null;
}

export interface CalibrationPreview {
	thermometer: { id: number; serial: string; kind: string };
	subrange: SubrangeId;
	points: PreviewPoint[];
	problems: string[];
	uTpwMilliKelvin: number;
	rTpwOhm: number | null;
	result: {
		coefficients: DeviationCoefficients;
		residuals: Residual[];
		table: TableRow[];
		curve: ReturnType<typeof deviationCurve>;
		atPoints: ReturnType<typeof propagate>[];
	} | null;
}

/**
 * The proposal (newest signed-off run per point unless `chosen` names another) and, when every point
 * has a plateau, the calibration it gives. Nothing is stored.
 */
export async function previewCalibration(app: App, thermometerId: number, subrangeId: SubrangeId, chosen: Partial<Record<FixedPointId, number>>, stepCelsius = 10): Promise<CalibrationPreview | null> {
	const thermometer = await app.db.selectFrom('thermometer').select(['id', 'serial', 'kind']).where('id', '=', thermometerId).executeTakeFirst();
	if (!thermometer) return null;
	const byPoint = await candidates(app.db, thermometerId, subrangeId);
	const uTpw = await tpwUncertaintyMilliKelvin(app.db);
	const problems: string[] = [];
	const points: PreviewPoint[] = Object.entries(byPoint).map(([p, options]) => {
		const point = p as FixedPointId;
		const run = options.find((o) => o.runId === chosen[point]) ?? options[0] ?? null;
		if (chosen[point] !== undefined && run?.runId !== chosen[point]) problems.push(`Run #${chosen[point]} is not a finished, signed-off ${fixedPoint(point).name.toLowerCase()} run of this thermometer.`);
		if (!run) {
			problems.push(`No finished, signed-off run at the ${fixedPoint(point).name.toLowerCase()} with this thermometer.`);
			return { point, options, run: null, measured: null, uW: null };
		}
		const measured = measuredPoint(app.sqlite, run.runId);
		if (!measured.ok) problems.push(`Run #${run.runId} (${point}): ${measured.problem}.`);
		return { point, options, run, measured, uW: null };
	});
	const base = { thermometer, subrange: subrangeId, points, problems, uTpwMilliKelvin: uTpw };
	if (problems.length) return { ...base, rTpwOhm: null, result: null };
	const values = points.map((p) => (p.measured as Extract<MeasuredResult, { ok: true }>).value);
	const input: CalibrationInput = { subrange: subrangeId, points: values.map((v) => ({ point: v.point, w: v.w, uMilliKelvin: v.uMilliKelvin })), uTpwMilliKelvin: uTpw };
	try {
		const { coefficients, residuals } = fitCalibration(input);
		for (const [i, p] of points.entries()) p.uW = uW(input.points[i], subrangeId, coefficients);
		// The R_TPW the thermometer had when the last of its runs was measured: the calibration's reference.
		const rTpwOhm = [...values].sort((a, b) => b.plateauMidMs - a.plateauMidMs)[0]?.rTpwOhm ?? null;
		if (rTpwOhm === null) return { ...base, rTpwOhm, result: null };
		return {
			...base,
			rTpwOhm,
			result: {
				coefficients,
				residuals,
				table: calibrationTable(subrangeId, coefficients, rTpwOhm, stepCelsius, input),
				curve: deviationCurve(subrangeId, coefficients),
				atPoints: input.points.map((p) => propagate(input, coefficients, fixedPoint(p.point).t90))
			}
		};
	} catch (e) {
		problems.push(`The fit failed: ${(e as Error).message}`);
		return { ...base, rTpwOhm: null, result: null };
	}
}

export interface StoredRun {
	point: FixedPointId;
	runId: number;
	cellSerial: string;
	w: number;
	rTpwOhm: number;
	resistanceOhm: number;
	plateauMidMs: number;
}

export interface StoredUncertainty {
	coverageFactor: number;
	uTpwMilliKelvin: number;
	points: { point: FixedPointId; runId: number; uMilliKelvin: number; uW: number; components: { name: string; contributionMilliKelvin: number; distribution: string }[] }[];
	note: string;
}

/** Recomputes the preview from the same choice and stores it as the thermometer's new current version. */
export async function storeCalibration(
	app: App,
	actor: SessionUser,
	thermometerId: number,
	subrangeId: SubrangeId,
	chosen: Partial<Record<FixedPointId, number>>,
	notes: string,
	nowMs = Date.now()
): Promise<{ ok: true; id: number; version: number } | { ok: false; status: number; message: string }> {
	const preview = await previewCalibration(app, thermometerId, subrangeId, chosen);
	if (!preview) return { ok: false, status: 404, message: `Thermometer #${thermometerId} does not exist.` };
	if (!preview.result || preview.rTpwOhm === null) return { ok: false, status: 422, message: preview.problems.join(' ') || 'The calibration cannot be computed.' };
	const { result, rTpwOhm } = preview;
	const measured = preview.points.map((p) => ({ p, v: (p.measured as Extract<MeasuredResult, { ok: true }>).value }));
	const runs: StoredRun[] = measured.map(({ p, v }) => ({ point: p.point, runId: v.runId, cellSerial: p.run!.cellSerial, w: v.w, rTpwOhm: v.rTpwOhm, resistanceOhm: v.resistanceOhm, plateauMidMs: v.plateauMidMs }));
	const uncertainty: StoredUncertainty = {
		coverageFactor: COVERAGE_FACTOR,
		uTpwMilliKelvin: preview.uTpwMilliKelvin,
		points: measured.map(({ p, v }) => ({
			point: p.point,
			runId: v.runId,
			uMilliKelvin: v.uMilliKelvin,
			uW: p.uW!,
			components: v.budget.components.map((c) => ({ name: c.name, contributionMilliKelvin: c.contribution, distribution: c.distribution }))
		})),
		note: CORRELATION_NOTE
	};
	const stored = await app.db.transaction().execute(async (trx) => {
		const previous = await trx.selectFrom('calibration').select(['id', 'version']).where('thermometer_id', '=', thermometerId).where('status', '=', 'current').executeTakeFirst();
		const last = await trx.selectFrom('calibration').select((eb) => eb.fn.max('version').as('v')).where('thermometer_id', '=', thermometerId).executeTakeFirst();
		const version = Number(last?.v ?? 0) + 1;
		if (previous) await trx.updateTable('calibration').set({ status: 'superseded' }).where('id', '=', previous.id).execute();
		const row = await trx
			.insertInto('calibration')
			.values({
				thermometer_id: thermometerId,
				version,
				subrange: subrangeId,
				coefficients_json: JSON.stringify(result.coefficients),
				r_tpw_ohm: rTpwOhm,
				runs_json: JSON.stringify(runs),
				uncertainty_json: JSON.stringify(uncertainty),
				status: 'current',
				notes,
				created_by: actor.id,
				created_at: nowMs
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		const coeffText = Object.entries(result.coefficients).map(([k, v]) => `${k} = ${v.toExponential(5)}`).join(', ');
		await recordAudit(trx, {
			actor,
			action: 'calibration.create',
			objectType: 'thermometer',
			objectId: thermometerId,
			summary: `Calibration v${version} of ${preview.thermometer.serial} (${subrangeId}) from runs ${runs.map((r) => `#${r.runId} (${r.point})`).join(', ')}: ${coeffText}${previous ? `; v${previous.version} superseded` : ''}`,
			details: { calibrationId: row.id, version, subrange: subrangeId, coefficients: result.coefficients, rTpwOhm, runs, supersededId: previous?.id ?? null },
			atMs: nowMs
		});
		return { id: row.id, version };
	});
	return { ok: true, ...stored };
}

export function listCalibrations(db: DB, thermometerId?: number) {
	let q = db
		.selectFrom('calibration')
		.innerJoin('thermometer', 'thermometer.id', 'calibration.thermometer_id')
		.leftJoin('user', 'user.id', 'calibration.created_by')
		.select(['calibration.id', 'calibration.version', 'calibration.subrange', 'calibration.status', 'calibration.created_at', 'calibration.r_tpw_ohm', 'calibration.coefficients_json', 'thermometer.id as thermometer_id', 'thermometer.serial', 'user.name as created_by_name'])
		.orderBy('thermometer.serial')
		.orderBy('calibration.version', 'desc');
	if (thermometerId !== undefined) q = q.where('calibration.thermometer_id', '=', thermometerId);
	return q.execute();
}

export interface CalibrationReport {
	id: number;
	version: number;
	status: 'current' | 'superseded';
	subrange: SubrangeId;
	createdAt: number;
	createdBy: string | null;
	notes: string;
	thermometer: { id: number; serial: string; kind: string; maker: string; nominalOhm: number };
	coefficients: DeviationCoefficients;
	rTpwOhm: number;
	runs: StoredRun[];
	uncertainty: StoredUncertainty;
	residuals: Residual[];
	table: TableRow[];
	curve: ReturnType<typeof deviationCurve>;
	stepCelsius: number;
	labName: string;
	/** true when the stored runs carry their measured W (versions made here; seeded ones do not) */
	fromRuns: boolean;
}

/** One stored version with its table and residuals recomputed from what was stored. */
export async function calibrationReport(db: DB, id: number, stepCelsius = 10): Promise<CalibrationReport | null> {
	const row = await db
		.selectFrom('calibration')
		.innerJoin('thermometer', 'thermometer.id', 'calibration.thermometer_id')
		.leftJoin('user', 'user.id', 'calibration.created_by')
		.selectAll('calibration')
		.select(['thermometer.serial', 'thermometer.kind', 'thermometer.maker', 'thermometer.nominal_ohm', 'user.name as created_by_name'])
		.where('calibration.id', '=', id)
		.executeTakeFirst();
	if (!row || !isSubrangeId(row.subrange)) return null;
	const subrangeId = row.subrange;
	const coefficients = JSON.parse(row.coefficients_json) as DeviationCoefficients;
	const runs = JSON.parse(row.runs_json) as StoredRun[];
	const stored = JSON.parse(row.uncertainty_json) as Partial<StoredUncertainty>;
	const uncertainty: StoredUncertainty = { coverageFactor: stored.coverageFactor ?? COVERAGE_FACTOR, uTpwMilliKelvin: stored.uTpwMilliKelvin ?? 0, points: stored.points ?? [], note: stored.note ?? '' };
	const fromRuns = runs.length > 0 && uncertainty.points.length === runs.length;
	const input: CalibrationInput = { subrange: subrangeId, points: fromRuns ? runs.map((r, i) => ({ point: r.point, w: r.w, uMilliKelvin: uncertainty.points[i].uMilliKelvin })) : [], uTpwMilliKelvin: uncertainty.uTpwMilliKelvin };
	const labName = await getSetting(db, 'lab.name', 'Temperature laboratory');
	const table = calibrationTable(subrangeId, coefficients, row.r_tpw_ohm, stepCelsius, fromRuns ? input : null);
	return {
		id: row.id,
		version: row.version,
		status: row.status,
		subrange: subrangeId,
		createdAt: row.created_at,
		createdBy: row.created_by_name,
		notes: row.notes,
		thermometer: { id: row.thermometer_id, serial: row.serial, kind: row.kind, maker: row.maker, nominalOhm: row.nominal_ohm },
		coefficients,
		rTpwOhm: row.r_tpw_ohm,
		runs,
		uncertainty,
		residuals: fromRuns ? residualsOf(subrangeId, coefficients, input.points) : [],
		table,
		curve: deviationCurve(subrangeId, coefficients),
		stepCelsius,
		labName,
		fromRuns
	};
}
