import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { appDatabase } from '$lib/server/db';
import { calibrationReport } from '$lib/server/calibration/service';
import { CALIBRATION_VIEW_ROLES, readStep } from '$lib/server/calibration/selection';
import { calibrationPdf, reportFilename } from '$lib/server/report/calibration-pdf';
import type { RequestHandler } from './$types';

export const GET = (async ({ locals, params, url }) => {
	requireRole(locals, CALIBRATION_VIEW_ROLES, url);
	const report = await calibrationReport(appDatabase().db, Number(params.id), readStep(url.searchParams.get('step')));
	if (!report) error(404, { message: `Calibration #${params.id} does not exist.`, code: 'not_found' });
	const pdf = await calibrationPdf(report);
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-length': String(pdf.length),
			'content-disposition': `attachment; filename="${reportFilename(report)}"`,
			'cache-control': 'private, no-store',
			'x-content-type-options': 'nosniff'
		}
	});
}) satisfies RequestHandler;
