import { json } from '@sveltejs/kit';
import { openApiDocument } from '$lib/server/ingest/openapi';
import type { RequestHandler } from './$types';

// Public: the instrument API's description (no secrets in it).
export const GET: RequestHandler = ({ url }) => json(openApiDocument(url.origin), { headers: { 'cache-control': 'public, max-age=300' } });
