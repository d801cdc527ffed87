// Parses a spooled bridge log into the staging tables, streamed: Papa.parse reads a Node Readable of
// the spool file and hands over one row at a time, so memory stays at one batch of rows whatever the
// file's size. Good rows go to upload_row, bad ones to upload_problem; nothing touches `reading` until
// the person confirms (confirm.ts).
//
// Writes share the app's better-sqlite3 handle with Kysely and the ingest writer: each batch is one
// short synchronous transaction, taken only while no Kysely transaction is open on the handle, and the
// loop yields between batches so the live ingest keeps its turn.
import { createReadStream } from 'node:fs';
import Papa from 'papaparse';
import type SQLite from 'better-sqlite3';
import type { DB } from '../db';
import { isSkippableRow, validateRow, type ColumnMapping, type RowProblem } from '../../upload/mapping';
import { MAX_LISTED_PROBLEMS, MAX_RUN_LOG_ROWS } from '../../upload/limits';
import { removeSpool, spoolPath } from './spool';

/** Uploads being parsed by this process (an upload left 'parsing' by a restart is not in here). */
const active = new Set<string>();

export function isParsing(id: string): boolean {
	return active.has(id);
}

const tick = () => new Promise<void>((r) => setImmediate(r));

async function outsideTransaction(sqlite: SQLite.Database): Promise<void> {
	while (sqlite.inTransaction) await new Promise((r) => setTimeout(r, 1));
}

interface StagedRow {
	seq: number | null;
	line: number;
	timeMs: number;
	ratio: number;
	currentMilliAmpere: number;
	channel: number;
}

export interface ParseOutcome {
	goodRows: number;
	badRows: number;
	message: string;
}

/**
 * Parses upload `id` (state 'received') with `mapping`. Resolves when done; progress (parsed_bytes,
 * good_rows, bad_rows) is written to the upload row after every batch for the status endpoint.
 */
export async function parseRunLog(app: { db: DB; sqlite: SQLite.Database; path: string }, id: string, mapping: ColumnMapping): Promise<ParseOutcome> {
	const { sqlite } = app;
	active.add(id);
	const file = spoolPath(app.path, id);
	const insertRow = sqlite.prepare('insert or ignore into upload_row (upload_id, seq, line, time_ms, ratio, current_ma, channel) values (?, ?, ?, ?, ?, ?, ?)');
	const insertProblem = sqlite.prepare('insert into upload_problem (upload_id, line, field, reason) values (?, ?, ?, ?)');
	const progress = sqlite.prepare('update upload set parsed_bytes = ?, good_rows = ?, bad_rows = ?, first_time_ms = ?, last_time_ms = ?, updated_at = ? where id = ?');
	const finish = sqlite.prepare('update upload set state = ?, message = ?, parsed_bytes = ?, good_rows = ?, bad_rows = ?, first_time_ms = ?, last_time_ms = ?, updated_at = ? where id = ?');

	let goodRows = 0;
	let badRows = 0;
	let listedProblems = 0;
	let dataRows = 0;
	let firstMs: number | null = null;
	let lastMs: number | null = null;
	let rows: StagedRow[] = [];
	let problems: RowProblem[] = [];

	const writeBatch = (bytes: number) => {
		sqlite.transaction(() => {
			for (const r of rows) {
				const seq = r.seq ?? goodRows;
				const changes = insertRow.run(id, seq, r.line, r.timeMs, r.ratio, r.currentMilliAmpere, r.channel).changes;
				if (changes === 0) {
					badRows++;
					if (listedProblems < MAX_LISTED_PROBLEMS) {
						insertProblem.run(id, r.line, 'seq', `seq ${seq} appears earlier in the file`);
						listedProblems++;
					}
					continue;
				}
				goodRows++;
				firstMs = firstMs === null ? r.timeMs : Math.min(firstMs, r.timeMs);
				lastMs = lastMs === null ? r.timeMs : Math.max(lastMs, r.timeMs);
			}
			for (const p of problems) {
				if (listedProblems >= MAX_LISTED_PROBLEMS) break;
				insertProblem.run(id, p.line, p.field, p.reason);
				listedProblems++;
			}
			progress.run(bytes, goodRows, badRows, firstMs, lastMs, Date.now(), id);
		})();
		rows = [];
		problems = [];
	};

	const source = createReadStream(file, { encoding: 'utf8', highWaterMark: 64 * 1024 });
	let state: 'parsed' | 'failed' = 'parsed';
	let message = '';
	let line = 0;
	// Papa's chunk mode: every row of one piece of the file at once (a row at a time through its Duplex
	// costs a pause and a 3 ms timer per 16 rows). The parser is paused while the batch is written, which
	// also pauses the file stream, so no more than one piece is held.
	await new Promise<void>((resolve) => {
		const take = (fields: string[]) => {
			line++;
			if (line === 1 && mapping.headerRow) return true;
			if (isSkippableRow(fields)) return true;
			if (++dataRows > MAX_RUN_LOG_ROWS) {
				state = 'failed';
				message = `The file has more than ${MAX_RUN_LOG_ROWS.toLocaleString('en')} data rows, the most one upload takes. Split it and upload the parts as separate runs.`;
				return false;
			}
			const result = validateRow(fields, mapping, line);
			if (result.ok) rows.push({ ...result.reading, line });
			else {
				badRows++;
				problems.push(...result.problems);
			}
			return true;
		};
		Papa.parse<string[]>(source, {
			delimiter: mapping.delimiter,
			header: false,
			skipEmptyLines: false,
			dynamicTyping: false,
			chunk: (results, parser) => {
				for (const fields of results.data) {
					if (!take(fields)) {
						parser.abort();
						return;
					}
				}
				parser.pause();
				void (async () => {
					try {
						await outsideTransaction(sqlite);
						writeBatch(source.bytesRead);
						await tick();
						parser.resume();
					} catch (e) {
						state = 'failed';
						message = `Staging failed: ${(e as Error).message}`;
						parser.abort();
					}
				})();
			},
			complete: () => resolve(),
			error: (e: Error) => {
				state = 'failed';
				message = `The file could not be read: ${e.message}`;
				resolve();
			}
		});
	});
	try {
		if (state === 'parsed') {
			await outsideTransaction(sqlite);
			writeBatch(source.bytesRead);
			if (goodRows === 0) message = 'No row of the file could be read with this mapping.';
		}
	} catch (e) {
		state = 'failed';
		message = `Staging failed: ${(e as Error).message}`;
	} finally {
		source.destroy();
	}
	await outsideTransaction(sqlite);
	if (state === 'failed') {
		sqlite.prepare('delete from upload_row where upload_id = ?').run(id);
		sqlite.prepare('delete from upload_problem where upload_id = ?').run(id);
	}
	finish.run(state, message, source.bytesRead, goodRows, badRows, firstMs, lastMs, Date.now(), id);
	active.delete(id);
	await removeSpool(app.path, id);
	return { goodRows, badRows, message };
}
