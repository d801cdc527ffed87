// Uploads arrive in chunks (see UPLOAD_CHUNK_BYTES) into a spool file under the data folder, next to
// the database. The `upload` row tracks how much arrived; a chunk is written at its stated offset, so
// a chunk sent twice (a retry after a lost answer) changes nothing. Memory per request: one chunk.
import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { open, rm } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import type { DB } from '../db';
import type { Upload } from '../db/schema';
import type { SessionUser } from '../auth/types';
import { MAX_DOCUMENT_BYTES, MAX_RUN_LOG_BYTES, UPLOAD_CHUNK_BYTES, UPLOAD_EXPIRY_MS, formatBytes } from '../../upload/limits';
import { UploadError } from './errors';

export type UploadPurpose = Upload['purpose'];
const MAX_BYTES: Record<UploadPurpose, number> = { 'run-log': MAX_RUN_LOG_BYTES, document: MAX_DOCUMENT_BYTES };
const ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** Folder of spool files: `uploads/` beside the database file (the data folder). */
export function spoolFolder(databasePath: string): string {
	const dir = join(dirname(databasePath), 'uploads');
	mkdirSync(dir, { recursive: true });
	return dir;
}

export function spoolPath(databasePath: string, id: string): string {
	if (!ID.test(id)) throw new UploadError(404, 'not_found', 'No such upload.');
	return join(spoolFolder(databasePath), `${id}.part`);
}

export async function createUpload(db: DB, databasePath: string, actor: SessionUser, input: { purpose: UploadPurpose; filename: string; sizeBytes: number }, nowMs = Date.now()): Promise<Upload> {
	const max = MAX_BYTES[input.purpose];
	if (input.sizeBytes > max) throw new UploadError(413, 'too_large', `The file has ${formatBytes(input.sizeBytes)}; at most ${formatBytes(max)} is accepted here.`, { maxBytes: max });
	if (input.sizeBytes <= 0) throw new UploadError(422, 'empty_file', 'The file is empty.');
	await discardStaleUploads(db, databasePath, nowMs);
	const id = randomUUID();
	const handle = await open(spoolPath(databasePath, id), 'w');
	await handle.close();
	return db
		.insertInto('upload')
		.values({ id, purpose: input.purpose, state: 'receiving', filename: input.filename.slice(0, 200), size_bytes: input.sizeBytes, created_by: actor.id, created_at: nowMs, updated_at: nowMs, run_id: null, first_time_ms: null, last_time_ms: null })
		.returningAll()
		.executeTakeFirstOrThrow();
}

/** The upload if it exists and belongs to `actor` (an upload is its maker's until confirmed). */
export async function ownUpload(db: DB, actor: SessionUser, id: string): Promise<Upload> {
	if (!ID.test(id)) throw new UploadError(404, 'not_found', 'No such upload.');
	const row = await db.selectFrom('upload').selectAll().where('id', '=', id).executeTakeFirst();
	if (!row || row.created_by !== actor.id) throw new UploadError(404, 'not_found', 'No such upload (or it has expired).');
	return row;
}

/** Reads a request body of at most `maxBytes` into memory, refusing more with 413 as it streams. */
export async function readBoundedBody(body: ReadableStream<Uint8Array> | null, maxBytes: number): Promise<Buffer> {
	if (!body) return Buffer.alloc(0);
	const parts: Uint8Array[] = [];
	let size = 0;
	const reader = body.getReader();
	for (;;) {
		const { done, value } = await reader.read();
		if (done) break;
		size += value.byteLength;
		if (size > maxBytes) {
			await reader.cancel();
			throw new UploadError(413, 'chunk_too_large', `A chunk may hold at most ${formatBytes(maxBytes)}.`);
		}
		parts.push(value);
	}
	return Buffer.concat(parts);
}

/** Writes one chunk at `offset`; returns the bytes received so far. */
export async function appendChunk(db: DB, databasePath: string, upload: Upload, offset: number, chunk: Buffer, check?: (first: Buffer) => void): Promise<number> {
	if (upload.state !== 'receiving') throw new UploadError(409, 'not_receiving', `This upload is ${upload.state}; it takes no more bytes.`);
	if (!Number.isSafeInteger(offset) || offset < 0 || offset > upload.received_bytes) {
		throw new UploadError(409, 'bad_offset', `Send the chunk at offset ${upload.received_bytes}.`, { receivedBytes: upload.received_bytes });
	}
	if (offset + chunk.length > upload.size_bytes) {
		throw new UploadError(413, 'too_large', `The upload was announced with ${upload.size_bytes} bytes; this chunk goes past that.`, { sizeBytes: upload.size_bytes });
	}
	if (offset === 0 && check) check(chunk);
	const handle = await open(spoolPath(databasePath, upload.id), 'r+');
	try {
		await handle.write(chunk, 0, chunk.length, offset);
	} finally {
		await handle.close();
	}
	const received = Math.max(upload.received_bytes, offset + chunk.length);
	const state = received === upload.size_bytes ? 'received' : 'receiving';
	await db.updateTable('upload').set({ received_bytes: received, state, updated_at: Date.now() }).where('id', '=', upload.id).execute();
	return received;
}

export async function removeSpool(databasePath: string, id: string): Promise<void> {
	await rm(spoolPath(databasePath, id), { force: true });
}

/** Discards an upload: its spool file, staged rows and problems. */
export async function discardUpload(db: DB, databasePath: string, id: string): Promise<void> {
	await removeSpool(databasePath, id);
	await db.deleteFrom('upload_problem').where('upload_id', '=', id).execute();
	await db.deleteFrom('upload_row').where('upload_id', '=', id).execute();
	await db.deleteFrom('upload').where('id', '=', id).execute();
}

/** Uploads untouched for UPLOAD_EXPIRY_MS go, with whatever they staged. */
export async function discardStaleUploads(db: DB, databasePath: string, nowMs = Date.now()): Promise<number> {
	const stale = await db.selectFrom('upload').select('id').where('updated_at', '<', nowMs - UPLOAD_EXPIRY_MS).execute();
	for (const { id } of stale) await discardUpload(db, databasePath, id);
	return stale.length;
}

export const CHUNK_BYTES = UPLOAD_CHUNK_BYTES;
