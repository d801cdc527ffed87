// Documents attached to cells and thermometers: a cell's assay, a thermometer's certificate. PDFs only,
// checked by content (the file must begin with `%PDF-`), at most MAX_DOCUMENT_BYTES. Stored in the
// database: they are few and small, so the database backup holds them, each row commits together with
// its audit entry, and no file path is ever built from user input.
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { z } from 'zod';
import type { DB } from '../db';
import type { SessionUser } from '../auth/types';
import { recordAudit } from '../repositories/audit';
import { MAX_DOCUMENT_BYTES, formatBytes } from '../../upload/limits';
import { UploadError } from '../upload/errors';
import { ownUpload, removeSpool, spoolPath } from '../upload/spool';

export const PDF_MAGIC = Buffer.from('%PDF-', 'latin1');
export const DOCUMENT_KINDS = ['assay', 'certificate', 'other'] as const;

export function looksLikePdf(head: Uint8Array): boolean {
	return head.length >= PDF_MAGIC.length && PDF_MAGIC.equals(Buffer.from(head.subarray(0, PDF_MAGIC.length)));
}

/** For the first chunk of a document upload: refuse a non-PDF before the rest is sent. */
export function requirePdf(head: Uint8Array): void {
	if (!looksLikePdf(head)) throw new UploadError(415, 'not_pdf', 'Only PDF files can be attached: this file does not begin with %PDF-.');
}

export const attachSchema = z.object({
	uploadId: z.string().min(1).max(64),
	ownerType: z.enum(['cell', 'thermometer']),
	ownerId: z.number().int().positive(),
	kind: z.enum(DOCUMENT_KINDS),
	title: z.string().trim().max(200).default('')
});

export interface DocumentSummary {
	id: number;
	owner_type: 'cell' | 'thermometer';
	owner_id: number;
	kind: 'assay' | 'certificate' | 'other';
	title: string;
	filename: string;
	size_bytes: number;
	sha256: string;
	uploaded_at: number;
	uploaded_by_name: string | null;
}

export function listDocuments(db: DB, ownerType: 'cell' | 'thermometer', ownerId: number): Promise<DocumentSummary[]> {
	return db
		.selectFrom('document')
		.leftJoin('user', 'user.id', 'document.uploaded_by')
		.select(['document.id', 'document.owner_type', 'document.owner_id', 'document.kind', 'document.title', 'document.filename', 'document.size_bytes', 'document.sha256', 'document.uploaded_at', 'user.name as uploaded_by_name'])
		.where('document.owner_type', '=', ownerType)
		.where('document.owner_id', '=', ownerId)
		.orderBy('document.uploaded_at', 'desc')
		.execute();
}

async function ownerLabel(db: DB, ownerType: 'cell' | 'thermometer', ownerId: number): Promise<string | null> {
	const row = await db.selectFrom(ownerType).select('serial').where('id', '=', ownerId).executeTakeFirst();
	return row ? `${ownerType} ${row.serial}` : null;
}

/** Turns a fully received document upload into a stored document. */
export async function attachDocument(app: { db: DB; path: string }, actor: SessionUser, body: unknown) {
	const parsed = attachSchema.safeParse(body);
	if (!parsed.success) throw new UploadError(422, 'bad_document', 'The document details are not valid.', parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
	const input = parsed.data;
	const upload = await ownUpload(app.db, actor, input.uploadId);
	if (upload.purpose !== 'document') throw new UploadError(409, 'wrong_purpose', 'This upload is not a document.');
	if (upload.state !== 'received') throw new UploadError(409, 'not_received', `Only ${upload.received_bytes} of ${upload.size_bytes} bytes have arrived.`);
	if (upload.size_bytes > MAX_DOCUMENT_BYTES) throw new UploadError(413, 'too_large', `A document may have at most ${formatBytes(MAX_DOCUMENT_BYTES)}.`);
	const owner = await ownerLabel(app.db, input.ownerType, input.ownerId);
	if (!owner) throw new UploadError(404, 'not_found', `No such ${input.ownerType}.`);
	const content = await readFile(spoolPath(app.path, upload.id));
	requirePdf(content);
	const sha256 = createHash('sha256').update(content).digest('hex');
	const filename = upload.filename.replace(/[\\/]/g, '_') || 'document.pdf';
	const doc = await app.db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('document')
			.values({ owner_type: input.ownerType, owner_id: input.ownerId, kind: input.kind, title: input.title, filename, content_type: 'application/pdf', size_bytes: content.length, sha256, content, uploaded_by: actor.id, uploaded_at: Date.now() })
			.returning(['id', 'filename', 'size_bytes', 'sha256', 'kind'])
			.executeTakeFirstOrThrow();
		await recordAudit(tx, { actor, action: 'document.attach', objectType: input.ownerType, objectId: input.ownerId, summary: `Attached ${input.kind} “${filename}” (${formatBytes(content.length)}) to ${owner}`, details: { documentId: row.id, filename, sizeBytes: content.length, sha256, kind: input.kind } });
		await tx.deleteFrom('upload').where('id', '=', upload.id).execute();
		return row;
	});
	await removeSpool(app.path, upload.id);
	return doc;
}

export function getDocument(db: DB, id: number) {
	return db.selectFrom('document').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function deleteDocument(db: DB, actor: SessionUser, id: number): Promise<boolean> {
	return db.transaction().execute(async (tx) => {
		const doc = await tx.selectFrom('document').select(['id', 'owner_type', 'owner_id', 'filename', 'sha256', 'size_bytes', 'kind']).where('id', '=', id).executeTakeFirst();
		if (!doc) return false;
		await tx.deleteFrom('document').where('id', '=', id).execute();
		const owner = (await ownerLabel(tx, doc.owner_type, doc.owner_id)) ?? `${doc.owner_type} #${doc.owner_id}`;
		await recordAudit(tx, { actor, action: 'document.delete', objectType: doc.owner_type, objectId: doc.owner_id, summary: `Removed ${doc.kind} “${doc.filename}” from ${owner}`, details: { documentId: doc.id, filename: doc.filename, sha256: doc.sha256, sizeBytes: doc.size_bytes } });
		return true;
	});
}

/** Headers for a download: the stored type, an attachment with a safe ASCII name plus the UTF-8 name. */
export function downloadHeaders(doc: { filename: string; content_type: string; size_bytes: number; sha256: string }): Record<string, string> {
	const ascii = doc.filename.replace(/[^A-Za-z0-9._ -]/g, '_');
	return {
		'content-type': doc.content_type,
		'content-length': String(doc.size_bytes),
		'content-disposition': `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(doc.filename)}`,
		'x-content-type-options': 'nosniff',
		'cache-control': 'private, no-store',
		etag: `"${doc.sha256}"`
	};
}

/** The form action both detail pages use to remove one of their documents. */
export async function removeDocumentOf(db: DB, actor: SessionUser, ownerType: 'cell' | 'thermometer', ownerId: number, form: FormData): Promise<{ ok: true } | { ok: false; status: 400 | 404; message: string }> {
	const id = Number(form.get('documentId'));
	if (!Number.isSafeInteger(id) || id <= 0) return { ok: false, status: 400, message: 'Which document?' };
	const doc = await db.selectFrom('document').select(['owner_type', 'owner_id']).where('id', '=', id).executeTakeFirst();
	if (!doc || doc.owner_type !== ownerType || doc.owner_id !== ownerId) return { ok: false, status: 404, message: 'That document is not attached here.' };
	await deleteDocument(db, actor, id);
	return { ok: true };
}
