import { postReadings } from '$lib/server/ingest/http';
import type { RequestHandler } from './$types';

// A batch of readings from an instrument (docs/ingest-protocol.md, "HTTP batch").
export const POST: RequestHandler = ({ request, params }) => postReadings(request, params.runId);
