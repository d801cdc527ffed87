import { json } from '@sveltejs/kit';

/** The one error shape of the API: `{ error: { code, message, details } }`. */
export interface ApiErrorBody {
	error: { code: string; message: string; details?: unknown };
}

export function apiErrorBody(code: string, message: string, details?: unknown): ApiErrorBody {
	return { error: details === undefined ? { code, message } : { code, message, details } };
}

export function apiError(status: number, code: string, message: string, details?: unknown, headers?: HeadersInit): Response {
	return json(apiErrorBody(code, message, details), { status, headers });
}
