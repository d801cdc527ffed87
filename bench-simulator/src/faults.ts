// Faults on demand, planned up front from the parameters so both passes of a run (truth and
// readings) see the same ones.

import type { ScenarioParams } from './params';
import type { BadValueKind, SimReading } from './types';

export interface FaultPlan {
	dropouts: { startS: number; endS: number }[];
	disconnects: { atS: number; durationS: number }[];
	/** Bad values in order: each applies to the first reading at or after atS. */
	badValues: { atS: number; kind: BadValueKind }[];
	furnaceControlLostAtS: number | null;
}

const BAD_ORDER: BadValueKind[] = ['nan', 'negative', 'duplicate', 'out-of-order'];

export function planFaults(p: ScenarioParams): FaultPlan {
	const atS = p.faultAtMinutes * 60;
	const plan: FaultPlan = { dropouts: [], disconnects: [], badValues: [], furnaceControlLostAtS: null };
	switch (p.fault) {
		case 'dropout':
			plan.dropouts.push({ startS: atS, endS: atS + p.dropoutMinutes * 60 });
			break;
		case 'disconnect':
			plan.disconnects.push({ atS, durationS: p.disconnectSeconds });
			break;
		case 'bad-values':
			for (let r = 0; r < p.badValueRepeats; r++) {
				BAD_ORDER.forEach((kind, i) => {
					plan.badValues.push({ atS: atS + (r * BAD_ORDER.length + i) * p.badValueSpacingMinutes * 60, kind });
				});
			}
			break;
		case 'drift':
			plan.furnaceControlLostAtS = atS;
			break;
		case null:
			break;
	}
	return plan;
}

export function inDropout(plan: FaultPlan, elapsedS: number): boolean {
	return plan.dropouts.some((d) => elapsedS >= d.startS && elapsedS < d.endS);
}

/** The readings a bad value turns one good reading into (a duplicate is the reading sent twice). */
export function corrupt(r: SimReading, kind: BadValueKind, previousTimeMs: number | null, intervalS: number): SimReading[] {
	switch (kind) {
		case 'nan':
			return [{ ...r, ratio: Number.NaN }];
		case 'negative':
			return [{ ...r, ratio: -r.ratio }];
		case 'duplicate':
			return [r, { ...r }];
		case 'out-of-order':
			// stamped two intervals before the previous reading: a clock step backwards
			return [{ ...r, timeMs: (previousTimeMs ?? r.timeMs) - 2 * intervalS * 1000 }];
	}
}
