import { requireUser } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { benchTiles } from '$lib/server/bench-screens/tiles';
import { openAlertsByBench } from '$lib/server/bench-screens/alerts';
import { ingestService } from '$lib/server/ingest/service';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals, depends }) => {
	requireUser(locals);
	depends('app:benches');
	const { db, sqlite } = appDatabase();
	const [tiles, alerts] = await Promise.all([benchTiles(db, sqlite), openAlertsByBench(db)]);
	return { tiles, summaries: ingestService().runs.overview(), alerts };
}) satisfies PageServerLoad;
