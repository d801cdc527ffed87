import { appDatabase } from '$lib/server/db';
import { currentCalibrations } from '$lib/server/repositories/equipment';
import type { PageServerLoad } from './$types';

export const load = (async () => ({ calibrations: await currentCalibrations(appDatabase().db) })) satisfies PageServerLoad;
