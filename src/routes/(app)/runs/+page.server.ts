import { appDatabase } from '$lib/server/db';
import { listRunSummaries } from '$lib/server/repositories/runs';
import type { PageServerLoad } from './$types';

export const load = (async () => ({ runs: await listRunSummaries(appDatabase().db, { limit: 100 }) })) satisfies PageServerLoad;
