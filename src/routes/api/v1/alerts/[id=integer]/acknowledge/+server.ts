import { appDatabase } from '$lib/server/db';
import { acknowledgeAlert } from '$lib/server/alerts/actions';
import { commentedAlertAction } from '$lib/server/alerts/http';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = ({ locals, params, request }) => commentedAlertAction(appDatabase().db, locals, Number(params.id), request, acknowledgeAlert);
