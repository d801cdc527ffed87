import { getBenchRun } from '$lib/server/ingest/http';
import type { RequestHandler } from './$types';

// The bench token's recording run (docs/ingest-protocol.md, "Finding the run").
export const GET: RequestHandler = ({ request }) => getBenchRun(request);
