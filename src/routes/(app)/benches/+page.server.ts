import { appDatabase } from '$lib/server/db';
import { listBenches } from '$lib/server/repositories/equipment';
import { recordingRunsByBench } from '$lib/server/repositories/runs';
import type { PageServerLoad } from './$types';

export const load = (async () => {
	const { db } = appDatabase();
	const [benches, recording] = await Promise.all([listBenches(db), recordingRunsByBench(db)]);
	const runByBench = new Map(recording.map((r) => [r.bench_id, r]));
	return { benches: benches.map((b) => ({ ...b, run: runByBench.get(b.id) ?? null })) };
}) satisfies PageServerLoad;
