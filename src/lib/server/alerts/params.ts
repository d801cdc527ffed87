// Rule parameters: built-in defaults, laboratory rules (all points or one fixed point), the run's own
// limits from its set-up, and a rule for one run — the most specific wins, field by field. Pure.

import { z } from 'zod';
import type { AlertKind } from '$lib/live/protocol';

export const ALERT_KINDS = ['drift', 'band', 'noise', 'silence', 'rtpw-shift', 'early-end'] as const satisfies readonly AlertKind[];

const pos = (max: number) => z.coerce.number().positive().max(max);
const nonNeg = (max: number) => z.coerce.number().min(0).max(max);

/** Per kind: the fields a rule may set, each with its unit in the name. */
export const PARAM_SCHEMAS = {
	drift: z.object({
		limitMilliKelvinPerHour: pos(1000),
		/** coverage factor on the slope's uncertainty */
		k: nonNeg(10),
		fitWindowMinutes: pos(240),
		sustainMinutes: nonNeg(240),
		clearMinutes: nonNeg(240),
		holdOffMinutes: nonNeg(1440)
	}),
	band: z.object({ limitMilliKelvin: pos(10_000), meanWindowSeconds: pos(3600), sustainSeconds: nonNeg(3600), clearSeconds: nonNeg(3600), holdOffMinutes: nonNeg(1440) }),
	noise: z.object({ limitMilliKelvin: pos(1000), sustainSeconds: nonNeg(3600), clearSeconds: nonNeg(3600), holdOffMinutes: nonNeg(1440) }),
	silence: z.object({ limitSeconds: pos(86_400), holdOffMinutes: nonNeg(1440) }),
	'rtpw-shift': z.object({ limitMilliKelvin: pos(1000) }),
	'early-end': z.object({ minPlateauMinutes: pos(10_000) })
} as const;

export type RuleParams = { [K in AlertKind]: z.infer<(typeof PARAM_SCHEMAS)[K]> };

export const DEFAULT_PARAMS: RuleParams = {
	drift: { limitMilliKelvinPerHour: 0.5, k: 2, fitWindowMinutes: 15, sustainMinutes: 10, clearMinutes: 5, holdOffMinutes: 30 },
	band: { limitMilliKelvin: 5, meanWindowSeconds: 60, sustainSeconds: 120, clearSeconds: 120, holdOffMinutes: 30 },
	noise: { limitMilliKelvin: 0.5, sustainSeconds: 300, clearSeconds: 120, holdOffMinutes: 30 },
	silence: { limitSeconds: 120, holdOffMinutes: 30 },
	'rtpw-shift': { limitMilliKelvin: 1 },
	'early-end': { minPlateauMinutes: 30 }
};

/** Level at which a condition counts as gone again, as a fraction of its limit (hysteresis). */
export const CLEAR_FRACTION = 0.8;

export const KIND_LABELS: Record<AlertKind, string> = {
	drift: 'Plateau drift',
	band: 'Value outside its band',
	noise: 'Noise above limit',
	silence: 'Instrument silent',
	'rtpw-shift': 'R_TPW shift',
	'early-end': 'Plateau ended early'
};

export const KIND_UNITS: Record<AlertKind, string> = { drift: 'mK/h', band: 'mK', noise: 'mK', silence: 's', 'rtpw-shift': 'mK', 'early-end': 'min' };

export interface RuleRow {
	id: number;
	kind: AlertKind;
	fixedPoint: string | null;
	runId: number | null;
	params: Record<string, unknown>;
	enabled: boolean;
}

/** The limits a technician set at run set-up (run.settings_json). */
export interface RunLimits {
	driftMilliKelvinPerHour?: number;
	bandMilliKelvin?: number;
	silenceSeconds?: number;
}

export function parseRunLimits(settingsJson: string | null | undefined): RunLimits {
	try {
		const limits = (JSON.parse(settingsJson ?? '{}') as { limits?: Record<string, unknown> }).limits ?? {};
		const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : undefined);
		return { driftMilliKelvinPerHour: num(limits.driftMilliKelvinPerHour), bandMilliKelvin: num(limits.bandMilliKelvin), silenceSeconds: num(limits.silenceSeconds) };
	} catch {
		return {};
	}
}

/** Keeps only the known, valid fields of a stored params object. */
export function cleanParams<K extends AlertKind>(kind: K, params: Record<string, unknown>): Partial<RuleParams[K]> {
	const shape = PARAM_SCHEMAS[kind].shape as Record<string, z.ZodType>;
	const out: Record<string, unknown> = {};
	for (const [key, schema] of Object.entries(shape)) {
		if (!(key in params)) continue;
		const r = schema.safeParse(params[key]);
		if (r.success) out[key] = r.data;
	}
	return out as Partial<RuleParams[K]>;
}

export interface Resolved<K extends AlertKind> {
	enabled: boolean;
	params: RuleParams[K];
	/** the rule whose settings were most specific (null: defaults or the run's limits only) */
	ruleId: number | null;
	/** where the limit came from, for the inbox and the e-mail */
	limitSource: 'default' | 'laboratory' | 'fixed point' | 'run set-up' | 'run rule';
}

/** Defaults < rule for all points < rule for the fixed point < the run's set-up limits < rule for the run. */
export function resolveRule<K extends AlertKind>(kind: K, rules: RuleRow[], fixedPoint: string, runId: number, limits: RunLimits): Resolved<K> {
	let params = { ...DEFAULT_PARAMS[kind] } as RuleParams[K];
	let enabled = true;
	let ruleId: number | null = null;
	let limitSource: Resolved<K>['limitSource'] = 'default';
	const layer = (r: RuleRow | undefined, source: Resolved<K>['limitSource']) => {
		if (!r) return;
		const clean = cleanParams(kind, r.params);
		params = { ...params, ...clean };
		enabled = r.enabled;
		ruleId = r.id;
		if (Object.keys(clean).some((k) => k.startsWith('limit') || k === 'minPlateauMinutes')) limitSource = source;
	};
	const mine = rules.filter((r) => r.kind === kind);
	layer(mine.find((r) => r.fixedPoint === null && r.runId === null), 'laboratory');
	layer(mine.find((r) => r.fixedPoint === fixedPoint && r.runId === null), 'fixed point');
	const runLimit = kind === 'drift' ? limits.driftMilliKelvinPerHour : kind === 'band' ? limits.bandMilliKelvin : kind === 'silence' ? limits.silenceSeconds : undefined;
	if (runLimit !== undefined) {
		const field = kind === 'drift' ? 'limitMilliKelvinPerHour' : kind === 'band' ? 'limitMilliKelvin' : 'limitSeconds';
		params = { ...params, [field]: runLimit };
		limitSource = 'run set-up';
	}
	layer(mine.find((r) => r.runId === runId), 'run rule');
	return { enabled, params, ruleId, limitSource };
}

export function limitOf(kind: AlertKind, p: RuleParams[AlertKind]): number {
	const o = p as Record<string, number>;
	return kind === 'drift' ? o.limitMilliKelvinPerHour : kind === 'silence' ? o.limitSeconds : kind === 'early-end' ? o.minPlateauMinutes : o.limitMilliKelvin;
}
