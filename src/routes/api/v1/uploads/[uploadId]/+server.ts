import { app, answer, json, uploader } from '$lib/server/upload/http';
import { discardOwnUpload, uploadStatus } from '$lib/server/upload/service';
import type { RequestHandler } from './$types';

/** How far the upload and its parsing are, and the bad rows found so far. */
export const GET = (({ locals, params }) => answer(async () => json(await uploadStatus(app(), uploader(locals), params.uploadId)))) satisfies RequestHandler;

/** Discards the upload and whatever it staged. */
export const DELETE = (({ locals, params }) =>
	answer(async () => {
		await discardOwnUpload(app(), uploader(locals), params.uploadId);
		return new Response(null, { status: 204 });
	})) satisfies RequestHandler;
