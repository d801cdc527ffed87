import { appDatabase } from '$lib/server/db';
import { latestRtpwByThermometer, listThermometers } from '$lib/server/repositories/equipment';
import type { PageServerLoad } from './$types';

export const load = (async () => {
	const { db } = appDatabase();
	const [thermometers, latest] = await Promise.all([listThermometers(db), latestRtpwByThermometer(db)]);
	return { thermometers: thermometers.map((t) => ({ ...t, latest: latest.get(t.id) ?? null })) };
}) satisfies PageServerLoad;
