import { app, answer, json, jsonBody, uploader } from '$lib/server/upload/http';
import { startParse } from '$lib/server/upload/service';
import type { RequestHandler } from './$types';

/** Parses a received run log with the column mapping in the body; poll GET /uploads/{id} for progress. */
export const POST = (({ locals, params, request }) =>
	answer(async () => {
		await startParse(app(), uploader(locals), params.uploadId, await jsonBody(request));
		return json({ id: params.uploadId, state: 'parsing' }, { status: 202 });
	})) satisfies RequestHandler;
