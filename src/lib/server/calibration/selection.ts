// What the engineer picked on the calibration page, read from the query string or the posted form.
import { FIXED_POINT_IDS, type FixedPointId, type SubrangeId } from '../../metrology/index';
import type { Role } from '../auth/types';
import { isSubrangeId, TABLE_STEPS_CELSIUS } from './service';

/** Who may look at calibrations and previews; who may store a new version. */
export const CALIBRATION_VIEW_ROLES: readonly Role[] = ['engineer', 'supervisor', 'admin'];
export const CALIBRATION_STORE_ROLES: readonly Role[] = ['engineer', 'admin'];

export interface Selection {
	thermometerId: number;
	subrange: SubrangeId;
	/** run chosen per point (`run_Sn=12`); a point not named gets the proposal */
	chosen: Partial<Record<FixedPointId, number>>;
	stepCelsius: number;
}

type Source = { get(name: string): unknown };

export function readSelection(src: Source): Selection | null {
	const thermometerId = Number(src.get('thermometer'));
	const subrange = src.get('subrange');
	if (!Number.isInteger(thermometerId) || thermometerId <= 0 || !isSubrangeId(subrange)) return null;
	const chosen: Partial<Record<FixedPointId, number>> = {};
	for (const p of FIXED_POINT_IDS) {
		const v = Number(src.get(`run_${p}`));
		if (Number.isInteger(v) && v > 0) chosen[p] = v;
	}
	return { thermometerId, subrange, chosen, stepCelsius: readStep(src.get('step')) };
}

/** The table step in °C: one of TABLE_STEPS_CELSIUS, else 10 °C. */
export function readStep(v: unknown): number {
	const step = Number(v);
	return (TABLE_STEPS_CELSIUS as readonly number[]).includes(step) ? step : 10;
}

export function selectionQuery(s: Selection): string {
	const q = new URLSearchParams({ thermometer: String(s.thermometerId), subrange: s.subrange, step: String(s.stepCelsius) });
	for (const [p, id] of Object.entries(s.chosen)) q.set(`run_${p}`, String(id));
	return q.toString();
}
