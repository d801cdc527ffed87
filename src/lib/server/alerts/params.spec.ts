import { describe, expect, it } from 'vitest';
import { DEFAULT_PARAMS, parseRunLimits, resolveRule, type RuleRow } from './params';

const rule = (r: Partial<RuleRow> & Pick<RuleRow, 'id' | 'kind'>): RuleRow => ({ fixedPoint: null, runId: null, params: {}, enabled: true, ...r });

describe('resolveRule', () => {
	it('defaults < all points < fixed point < run set-up limits < rule for the run', () => {
		const rules = [
			rule({ id: 1, kind: 'drift', params: { limitMilliKelvinPerHour: 1, k: 3 } }),
			rule({ id: 2, kind: 'drift', fixedPoint: 'Zn', params: { limitMilliKelvinPerHour: 0.8 } }),
			rule({ id: 3, kind: 'drift', runId: 9, params: { sustainMinutes: 3 } })
		];
		expect(resolveRule('drift', [], 'Zn', 1, {}).params).toEqual(DEFAULT_PARAMS.drift);
		expect(resolveRule('drift', rules.slice(0, 1), 'Zn', 1, {})).toMatchObject({ params: { limitMilliKelvinPerHour: 1, k: 3 }, ruleId: 1, limitSource: 'laboratory' });
		expect(resolveRule('drift', rules, 'Sn', 1, {}).params.limitMilliKelvinPerHour).toBe(1);
		expect(resolveRule('drift', rules, 'Zn', 1, {})).toMatchObject({ params: { limitMilliKelvinPerHour: 0.8, k: 3 }, ruleId: 2, limitSource: 'fixed point' });
		expect(resolveRule('drift', rules, 'Zn', 1, { driftMilliKelvinPerHour: 0.3 })).toMatchObject({ params: { limitMilliKelvinPerHour: 0.3 }, limitSource: 'run set-up' });
		expect(resolveRule('drift', rules, 'Zn', 9, { driftMilliKelvinPerHour: 0.3 }).params).toMatchObject({ limitMilliKelvinPerHour: 0.3, sustainMinutes: 3, k: 3 });
	});
	it('a disabled fixed-point rule turns the kind off for that point only; bad fields are ignored', () => {
		const rules = [rule({ id: 1, kind: 'noise', fixedPoint: 'TPW', enabled: false }), rule({ id: 2, kind: 'band', params: { limitMilliKelvin: -3, sustainSeconds: 'x' } })];
		expect(resolveRule('noise', rules, 'TPW', 1, {}).enabled).toBe(false);
		expect(resolveRule('noise', rules, 'Ga', 1, {}).enabled).toBe(true);
		expect(resolveRule('band', rules, 'Ga', 1, {}).params).toEqual(DEFAULT_PARAMS.band);
	});
	it('silence and band take the run’s set-up limits', () => {
		expect(resolveRule('silence', [], 'Ga', 1, { silenceSeconds: 45 }).params.limitSeconds).toBe(45);
		expect(resolveRule('band', [], 'Ga', 1, { bandMilliKelvin: 2 }).params.limitMilliKelvin).toBe(2);
	});
});

describe('parseRunLimits', () => {
	it('reads settings_json.limits and ignores what is not a positive number', () => {
		expect(parseRunLimits(JSON.stringify({ limits: { driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 'x', silenceSeconds: -1 } }))).toEqual({ driftMilliKelvinPerHour: 0.5, bandMilliKelvin: undefined, silenceSeconds: undefined });
		expect(parseRunLimits('not json')).toEqual({});
	});
});
