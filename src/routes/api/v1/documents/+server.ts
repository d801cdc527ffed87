import { attachDocument } from '$lib/server/documents';
import { app, answer, json, jsonBody, uploader } from '$lib/server/upload/http';
import type { RequestHandler } from './$types';

/** Attaches a received PDF upload to a cell or thermometer. */
export const POST = (({ locals, request }) =>
	answer(async () => {
		const doc = await attachDocument(app(), uploader(locals), await jsonBody(request));
		return json({ id: doc.id, filename: doc.filename, sizeBytes: doc.size_bytes, sha256: doc.sha256 }, { status: 201 });
	})) satisfies RequestHandler;
