/**
 * Plateau detector: a live tracker over streamed readings and the final analysis of a completed run.
 * Pure TypeScript, no I/O; ITS-90 maths comes from the metrology core.
 */
import type { FixedPointId } from '../metrology/index';
import { analyseRun as analyse, type AnalysisOptions, type RunAnalysis } from './analysis';
import type { PlateauKind, Sample } from './types';

export type { Sample, PlateauResult, PlateauKind, TrackerSnapshot, TrackerState, TrackerOptions } from './types';
export type { RunAnalysis, AnalysisOptions, FractionPoint, RaoultFit, SlopeOver } from './analysis';
export type { PlateauBudget, BudgetLineSource } from './budget';
export type { CurrentStep } from './current-step';
export { createPlateauTracker, restorePlateauTracker, type PlateauTracker, type TrackerJSON } from './tracker';

export function analyseRun(
	samples: Sample[],
	options: { kind: PlateauKind; point?: FixedPointId; depthMetre?: number; pressurePa?: number; purityPercent?: number } & Partial<AnalysisOptions>
): RunAnalysis {
	return analyse(samples, options as AnalysisOptions);
}
