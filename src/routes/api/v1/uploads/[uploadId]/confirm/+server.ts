import { app, answer, json, jsonBody, uploader } from '$lib/server/upload/http';
import { confirmUpload } from '$lib/server/upload/service';
import type { RequestHandler } from './$types';

/** Stores the parsed rows as a finished run with the run details in the body. */
export const POST = (({ locals, params, request }) =>
	answer(async () => {
		const run = await confirmUpload(app(), uploader(locals), params.uploadId, await jsonBody(request));
		return json({ runId: run.id, readings: run.reading_count }, { status: 201 });
	})) satisfies RequestHandler;
