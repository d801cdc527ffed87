import { deleteDocument, downloadHeaders, getDocument } from '$lib/server/documents';
import { apiError } from '$lib/server/http/api-error';
import { app, answer, uploader } from '$lib/server/upload/http';
import type { RequestHandler } from './$types';

/** Downloads a document (every signed-in role; `handle` has checked the session). */
export const GET = (async ({ params }) => {
	const doc = await getDocument(app().db, Number(params.id));
	if (!doc) return apiError(404, 'not_found', `Document #${params.id} does not exist.`);
	return new Response(new Uint8Array(doc.content), { headers: downloadHeaders(doc) });
}) satisfies RequestHandler;

export const DELETE = (({ locals, params }) =>
	answer(async () => {
		const removed = await deleteDocument(app().db, uploader(locals), Number(params.id));
		return removed ? new Response(null, { status: 204 }) : apiError(404, 'not_found', `Document #${params.id} does not exist.`);
	})) satisfies RequestHandler;
