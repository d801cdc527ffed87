// Small helpers for the upload and document endpoints.
import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { appDatabase } from '../db';
import { UploadError } from './errors';

export { answer } from './errors';
export { uploader } from './roles';

export function app() {
	const { db, sqlite, path } = appDatabase();
	return { db, sqlite, path };
}

export async function jsonBody(request: Request): Promise<unknown> {
	try {
		return await request.json();
	} catch {
		throw new UploadError(400, 'bad_json', 'The request body is not JSON.');
	}
}

export const createSchema = z.object({
	purpose: z.enum(['run-log', 'document']),
	filename: z.string().trim().min(1).max(200),
	sizeBytes: z.number().int().min(0)
});

export function parseOrFail<T>(schema: z.ZodType<T>, value: unknown, code: string): T {
	const r = schema.safeParse(value);
	if (!r.success) throw new UploadError(422, code, 'The request is not valid.', r.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
	return r.data;
}

export { json };
