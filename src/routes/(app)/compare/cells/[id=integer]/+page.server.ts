import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { cellHistory, compareCells, realizations } from '$lib/server/compare';
import type { PageServerLoad } from './$types';

export const load = (async ({ locals, params, url }) => {
	requireRole(locals, ['engineer', 'supervisor', 'admin'], url);
	const { db, sqlite } = appDatabase();
	const cell = await db.selectFrom('cell').selectAll().where('id', '=', Number(params.id)).executeTakeFirst();
	if (!cell) error(404, { message: `Cell #${params.id} does not exist.`, code: 'not_found' });
	const siblings = await db.selectFrom('cell').select(['id', 'serial']).where('fixed_point', '=', cell.fixed_point).where('id', '!=', cell.id).orderBy('serial').execute();
	const history = await cellHistory(db, sqlite, cell.id);
	const otherId = Number(url.searchParams.get('other')) || siblings[0]?.id || null;
	const other = siblings.find((s) => s.id === otherId) ?? null;
	const pairs = other ? compareCells(history.realizations, (await realizations(db, sqlite, other.id)).realizations) : [];
	return { cell, siblings, history, other, pairs };
}) satisfies PageServerLoad;
