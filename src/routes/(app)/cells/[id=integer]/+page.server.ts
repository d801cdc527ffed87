import { error, fail } from '@sveltejs/kit';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { listDocuments, removeDocumentOf } from '$lib/server/documents';
import { getCell, runsOfCell } from '$lib/server/repositories/equipment-history';
import { UPLOAD_ROLES } from '$lib/server/upload/roles';
import type { Actions, PageServerLoad } from './$types';

async function cellOr404(id: string) {
	const cell = await getCell(appDatabase().db, Number(id));
	if (!cell) error(404, { message: `Cell #${id} does not exist.`, code: 'not_found' });
	return cell;
}

export const load = (async ({ locals, params }) => {
	const user = requireUser(locals);
	const { db } = appDatabase();
	const cell = await cellOr404(params.id);
	const [runs, documents] = await Promise.all([runsOfCell(db, cell.id), listDocuments(db, 'cell', cell.id)]);
	return { cell, runs, documents, canWrite: UPLOAD_ROLES.includes(user.role) };
}) satisfies PageServerLoad;

export const actions = {
	deleteDocument: async ({ locals, params, request }) => {
		const actor = requireRole(locals, UPLOAD_ROLES);
		const cell = await cellOr404(params.id);
		const r = await removeDocumentOf(appDatabase().db, actor, 'cell', cell.id, await request.formData());
		return r.ok ? { action: 'deleteDocument', done: 'Document removed.' } : fail(r.status, { action: 'deleteDocument', message: r.message });
	}
} satisfies Actions;
