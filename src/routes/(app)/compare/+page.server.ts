import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { FIXED_POINT_IDS } from '$lib/metrology';
import { filterOptions, finishedRuns, immersionRuns, overlay, readFilters, type Align } from '$lib/server/compare';
import type { PageServerLoad } from './$types';

const ROLES = ['engineer', 'supervisor', 'admin'] as const;
const MAX_RUNS = 12;

export const load = (async ({ locals, url }) => {
	requireRole(locals, ROLES, url);
	const { db, sqlite } = appDatabase();
	const filters = readFilters(url.searchParams);
	const align: Align = url.searchParams.get('align') === 'fraction' ? 'fraction' : 'start';
	const chosenIds = [...new Set(url.searchParams.getAll('run').map(Number).filter((n) => Number.isInteger(n) && n > 0))].slice(0, MAX_RUNS);
	const referenceRunId = Number(url.searchParams.get('reference')) || null;
	const [runs, options, immersion, allFinished] = await Promise.all([finishedRuns(db, filters), filterOptions(db), immersionRuns(db), finishedRuns(db)]);
	const chosen = allFinished.filter((r) => chosenIds.includes(r.id));
	const result = chosen.length ? overlay(sqlite, chosen, align, chosen.some((r) => r.id === referenceRunId) ? referenceRunId : null) : null;
	return { filters, align, runs, chosenIds, referenceRunId, options, points: FIXED_POINT_IDS, immersion, result, maxRuns: MAX_RUNS };
}) satisfies PageServerLoad;
