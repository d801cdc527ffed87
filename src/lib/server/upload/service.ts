// A past run from a bridge log: receive (spool.ts) → parse into staging (parse.ts) → the person looks at
// the bad rows → confirm: one transaction creates the finished run and moves the staged rows into
// `reading`. Nothing is a run before that.
import { sql } from 'kysely';
import { z } from 'zod';
import type SQLite from 'better-sqlite3';
import type { DB } from '../db';
import type { Run } from '../db/schema';
import type { SessionUser } from '../auth/types';
import { recordAudit } from '../repositories/audit';
import { mappingSchema, type ColumnMapping, type UploadStatus } from '../../upload/mapping';
import { MAX_LISTED_PROBLEMS } from '../../upload/limits';
import { UploadError } from './errors';
import { isParsing, parseRunLog } from './parse';
import { discardUpload, ownUpload } from './spool';

type App = { db: DB; sqlite: SQLite.Database; path: string };

export const confirmSchema = z.object({
	benchId: z.number().int().positive(),
	cellId: z.number().int().positive(),
	thermometerId: z.number().int().positive(),
	resistorId: z.number().int().positive(),
	fixedPoint: z.enum(['Ar', 'Hg', 'TPW', 'Ga', 'In', 'Sn', 'Zn', 'Al', 'Ag']),
	kind: z.enum(['melt', 'freeze', 'triple-point']),
	/** Depth of the sensor below the free surface of the fixed-point substance, m. */
	sensorDepthM: z.number().min(0).max(2),
	gasPressurePa: z.number().min(1_000).max(300_000),
	notes: z.string().max(2000).default(''),
	/** Confirm although some rows were bad: they are left out. */
	skipBadRows: z.boolean()
});
export type ConfirmInput = z.infer<typeof confirmSchema>;

/** Starts parsing a fully received run log; answers at once, progress is in the status. */
export async function startParse(app: App, actor: SessionUser, id: string, mappingInput: unknown): Promise<void> {
	const upload = await ownUpload(app.db, actor, id);
	if (upload.purpose !== 'run-log') throw new UploadError(409, 'wrong_purpose', 'This upload is not a run log.');
	if (upload.state !== 'received') throw new UploadError(409, 'not_received', upload.state === 'receiving' ? `Only ${upload.received_bytes} of ${upload.size_bytes} bytes have arrived.` : `This upload is already ${upload.state}.`);
	const parsed = mappingSchema.safeParse(mappingInput);
	if (!parsed.success) throw new UploadError(422, 'bad_mapping', 'The column mapping is not valid.', parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
	const taken = await app.db.updateTable('upload').set({ state: 'parsing', mapping_json: JSON.stringify(parsed.data), updated_at: Date.now() }).where('id', '=', id).where('state', '=', 'received').executeTakeFirst();
	if (Number(taken.numUpdatedRows) !== 1) throw new UploadError(409, 'not_received', 'This upload is already being parsed.');
	void parseRunLog(app, id, parsed.data).catch((e) => console.error('upload: parse failed', e));
}


export type { UploadStatus };

export async function uploadStatus(app: App, actor: SessionUser, id: string): Promise<UploadStatus> {
	let u = await ownUpload(app.db, actor, id);
	if (u.state === 'parsing' && !isParsing(id)) {
		// The server restarted while this file was parsed: say so rather than wait forever.
		await app.db.updateTable('upload').set({ state: 'failed', message: 'Parsing stopped (the server restarted). Upload the file again.' }).where('id', '=', id).execute();
		u = await ownUpload(app.db, actor, id);
	}
	const problems = u.state === 'parsed' || u.state === 'parsing' ? await app.db.selectFrom('upload_problem').select(['line', 'field', 'reason']).where('upload_id', '=', id).orderBy('line').limit(MAX_LISTED_PROBLEMS).execute() : [];
	return {
		id: u.id,
		purpose: u.purpose,
		state: u.state,
		filename: u.filename,
		sizeBytes: u.size_bytes,
		receivedBytes: u.received_bytes,
		parsedBytes: u.parsed_bytes,
		goodRows: u.good_rows,
		badRows: u.bad_rows,
		firstTimeMs: u.first_time_ms,
		lastTimeMs: u.last_time_ms,
		message: u.message,
		runId: u.run_id,
		mapping: u.mapping_json === '{}' ? null : (JSON.parse(u.mapping_json) as ColumnMapping),
		problems,
		problemsListed: problems.length
	};
}

/** Creates the finished run from the staged rows, in one transaction, and logs it. */
export async function confirmUpload(app: App, actor: SessionUser, id: string, body: unknown): Promise<Run> {
	const parsed = confirmSchema.safeParse(body);
	if (!parsed.success) throw new UploadError(422, 'bad_run_details', 'The run details are not valid.', parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
	const input = parsed.data;
	return app.db.transaction().execute(async (tx) => {
		const upload = await ownUpload(tx, actor, id);
		if (upload.state !== 'parsed') throw new UploadError(409, 'not_parsed', upload.state === 'confirmed' ? `Already confirmed as run #${upload.run_id}.` : `This upload is ${upload.state}, not ready to confirm.`);
		if (upload.good_rows === 0) throw new UploadError(422, 'no_rows', 'No good rows to store.');
		if (upload.bad_rows > 0 && !input.skipBadRows) throw new UploadError(409, 'bad_rows', `${upload.bad_rows} rows could not be read: fix the file and upload it again, or confirm with those rows skipped.`, { badRows: upload.bad_rows });
		const [bench, cell, thermometer, resistor] = await Promise.all([
			tx.selectFrom('bench').select('id').where('id', '=', input.benchId).executeTakeFirst(),
			tx.selectFrom('cell').select(['id', 'fixed_point', 'serial']).where('id', '=', input.cellId).executeTakeFirst(),
			tx.selectFrom('thermometer').select('id').where('id', '=', input.thermometerId).executeTakeFirst(),
			tx.selectFrom('standard_resistor').select('id').where('id', '=', input.resistorId).executeTakeFirst()
		]);
		const missing = [!bench && 'bench', !cell && 'cell', !thermometer && 'thermometer', !resistor && 'standard resistor'].filter(Boolean);
		if (missing.length > 0) throw new UploadError(422, 'unknown_equipment', `No such ${missing.join(', ')}.`);
		if (cell!.fixed_point !== input.fixedPoint) throw new UploadError(422, 'fixed_point_mismatch', `Cell ${cell!.serial} realizes ${cell!.fixed_point}, not ${input.fixedPoint}.`);
		const nowMs = Date.now();
		const mapping = JSON.parse(upload.mapping_json) as ColumnMapping;
		const run = await tx
			.insertInto('run')
			.values({
				bench_id: input.benchId,
				cell_id: input.cellId,
				thermometer_id: input.thermometerId,
				resistor_id: input.resistorId,
				fixed_point: input.fixedPoint,
				kind: input.kind,
				state: 'finished',
				operator_id: actor.id,
				created_by: actor.id,
				created_at: nowMs,
				started_at: upload.first_time_ms,
				ended_at: upload.last_time_ms,
				sensor_depth_m: input.sensorDepthM,
				gas_pressure_pa: input.gasPressurePa,
				settings_json: JSON.stringify({ source: 'upload', uploadId: id, filename: upload.filename, mapping, skippedRows: upload.bad_rows }),
				notes: input.notes,
				last_reading_at: upload.last_time_ms
			})
			.returningAll()
			.executeTakeFirstOrThrow();
		// Staged rows are in (upload_id, seq) order, which is reading's own key order for this run.
		await sql`insert into reading (run_id, seq, time_ms, ratio, current_ma, channel) select ${run.id}, seq, time_ms, ratio, current_ma, channel from upload_row where upload_id = ${id} order by seq`.execute(tx);
		const stats = await tx.selectFrom('reading').select([(eb) => eb.fn.countAll<number>().as('n'), (eb) => eb.fn.max('seq').as('maxSeq')]).where('run_id', '=', run.id).executeTakeFirstOrThrow();
		const updated = await tx.updateTable('run').set({ reading_count: Number(stats.n), highest_seq: Number(stats.maxSeq) }).where('id', '=', run.id).returningAll().executeTakeFirstOrThrow();
		await tx.updateTable('upload').set({ state: 'confirmed', run_id: run.id, updated_at: nowMs }).where('id', '=', id).execute();
		await tx.deleteFrom('upload_row').where('upload_id', '=', id).execute();
		await tx.deleteFrom('upload_problem').where('upload_id', '=', id).execute();
		await recordAudit(tx, {
			actor,
			action: 'run.import',
			objectType: 'run',
			objectId: run.id,
			summary: `Imported past run #${run.id} from ${upload.filename}: ${updated.reading_count} readings${upload.bad_rows ? `, ${upload.bad_rows} bad rows skipped` : ''}`,
			details: { uploadId: id, filename: upload.filename, sizeBytes: upload.size_bytes, readings: updated.reading_count, skippedRows: upload.bad_rows, ...input },
			atMs: nowMs
		});
		return updated;
	});
}

export async function discardOwnUpload(app: App, actor: SessionUser, id: string): Promise<void> {
	const upload = await ownUpload(app.db, actor, id);
	if (upload.state === 'parsing') throw new UploadError(409, 'parsing', 'Wait until parsing ends, then discard.');
	if (upload.state === 'confirmed') throw new UploadError(409, 'confirmed', `Already stored as run #${upload.run_id}.`);
	await discardUpload(app.db, app.path, id);
}
