import { json } from '@sveltejs/kit';

/** The one error shape of the API: `{ error: { code, message, details } }`. */
export interface ApiErrorBody {
	error: { code: string; message: string; details?: unknown };
}

export function apiError(status: number, code: string, message: string, details?: unknown, headers?: HeadersInit): Response {
	const body: ApiErrorBody = { error: details === undefined ? { code, message } : { code, message, details } };
	return json(body, { status, headers });
}
