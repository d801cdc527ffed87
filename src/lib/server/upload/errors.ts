import { apiError } from '../http/api-error';

/** A refusal with the HTTP status and code the API answers with. */
export class UploadError extends Error {
	constructor(
		readonly status: 400 | 403 | 404 | 409 | 413 | 415 | 422,
		readonly code: string,
		message: string,
		readonly details?: unknown
	) {
		super(message);
	}
}

/** For +server.ts handlers: turns an UploadError into the API's error shape, rethrows anything else. */
export async function answer(run: () => Promise<Response>): Promise<Response> {
	try {
		return await run();
	} catch (e) {
		if (e instanceof UploadError) return apiError(e.status, e.code, e.message, e.details);
		throw e;
	}
}
