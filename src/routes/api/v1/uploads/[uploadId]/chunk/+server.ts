import { requirePdf } from '$lib/server/documents';
import { app, answer, json, uploader } from '$lib/server/upload/http';
import { UploadError } from '$lib/server/upload/errors';
import { CHUNK_BYTES, appendChunk, ownUpload, readBoundedBody } from '$lib/server/upload/spool';
import type { RequestHandler } from './$types';

/** One chunk of the file, raw bytes, written at the offset in the `x-upload-offset` header. */
export const POST = (({ locals, params, request }) =>
	answer(async () => {
		const actor = uploader(locals);
		const a = app();
		const upload = await ownUpload(a.db, actor, params.uploadId);
		const offsetHeader = request.headers.get('x-upload-offset');
		if (offsetHeader === null || !/^\d+$/.test(offsetHeader)) throw new UploadError(400, 'bad_offset', 'Say where the chunk goes in the x-upload-offset header.');
		const chunk = await readBoundedBody(request.body, CHUNK_BYTES);
		const received = await appendChunk(a.db, a.path, upload, Number(offsetHeader), chunk, upload.purpose === 'document' ? requirePdf : undefined);
		return json({ receivedBytes: received, sizeBytes: upload.size_bytes });
	})) satisfies RequestHandler;
