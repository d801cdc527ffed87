import { appDatabase } from '$lib/server/db';
import { listCells } from '$lib/server/repositories/equipment';
import type { PageServerLoad } from './$types';

export const load = (async () => ({ cells: await listCells(appDatabase().db) })) satisfies PageServerLoad;
