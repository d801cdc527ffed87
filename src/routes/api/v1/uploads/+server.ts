import { app, answer, createSchema, json, jsonBody, parseOrFail, uploader } from '$lib/server/upload/http';
import { CHUNK_BYTES, createUpload } from '$lib/server/upload/spool';
import type { RequestHandler } from './$types';

/** Announces a file (purpose, name, size); the bytes follow in chunks to /uploads/{id}/chunk. */
export const POST = (({ locals, request }) =>
	answer(async () => {
		const actor = uploader(locals);
		const input = parseOrFail(createSchema, await jsonBody(request), 'bad_upload');
		const a = app();
		const upload = await createUpload(a.db, a.path, actor, input);
		return json({ id: upload.id, sizeBytes: upload.size_bytes, chunkBytes: CHUNK_BYTES }, { status: 201 });
	})) satisfies RequestHandler;
