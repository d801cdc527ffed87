import { describe, expect, it } from 'vitest';
import { guessColumns, guessTimeUnit, isSkippableRow, mappingSchema, parseTimeMs, validateRow, type ColumnMapping } from './mapping';

// Epoch values worked by hand: 2025-01-01T00:00Z = 1 735 689 600 s (common reference value);
// + 365 days × 86 400 s = 1 767 225 600 s for 2026-01-01T00:00Z; + 62 days (Jan 31 + Feb 28 + 3)
// = 1 772 582 400 s for 2026-03-04T00:00Z; + 05:06:07.250 (18 367.25 s) = 1 772 600 767.25 s.
const T = 1_772_600_767_250;

describe('parseTimeMs', () => {
	it('reads ISO text with Z, with an offset, and with the mapping zone when the text has none', () => {
		expect(parseTimeMs('2026-03-04T05:06:07.250Z', 'iso', 'UTC')).toEqual({ ok: true, ms: T });
		expect(parseTimeMs('2026-03-04T05:06:07.250+01:00', 'iso', 'UTC')).toEqual({ ok: true, ms: T - 3_600_000 });
		expect(parseTimeMs('2026-03-04 05:06:07.25', 'iso', '+01:00')).toEqual({ ok: true, ms: T - 3_600_000 });
		expect(parseTimeMs('2026-03-04 05:06:07.25', 'iso', '-05:30')).toEqual({ ok: true, ms: T + 5.5 * 3_600_000 });
		// The text's own offset wins over the mapping's zone; "+0100" without a colon is accepted.
		expect(parseTimeMs('2026-03-04T05:06:07.250+0100', 'iso', '-05:00')).toEqual({ ok: true, ms: T - 3_600_000 });
		expect(parseTimeMs('2026-03-04T05:06', 'iso', 'UTC')).toEqual({ ok: true, ms: T - 7_250 });
	});

	it('reads epoch seconds (fractional) and milliseconds', () => {
		expect(parseTimeMs('1772600767.25', 'epoch-s', 'UTC')).toEqual({ ok: true, ms: T });
		expect(parseTimeMs('1772600767250', 'epoch-ms', 'UTC')).toEqual({ ok: true, ms: T });
	});

	it('gives a reason for what it cannot read', () => {
		expect(parseTimeMs('', 'iso', 'UTC')).toEqual({ ok: false, reason: 'empty' });
		expect(parseTimeMs('04/03/2026 05:06', 'iso', 'UTC').ok).toBe(false);
		expect(parseTimeMs('2026-02-31T00:00:00Z', 'iso', 'UTC')).toEqual({ ok: false, reason: 'no such day in that month' });
		expect(parseTimeMs('2026-13-01T00:00:00Z', 'iso', 'UTC')).toEqual({ ok: false, reason: 'date or time field out of range' });
		expect(parseTimeMs('2026-01-01T00:00:00+15:00', 'iso', 'UTC').ok).toBe(false);
		expect(parseTimeMs('abc', 'epoch-s', 'UTC').ok).toBe(false);
		// Milliseconds read as seconds land far past 2200: refused as a unit mistake.
		expect(parseTimeMs('1772600767250', 'epoch-s', 'UTC')).toEqual({ ok: false, reason: 'outside 1970–2200: check the time unit' });
	});
});

const mapping: ColumnMapping = {
	delimiter: ',',
	headerRow: true,
	columns: { time: 0, ratio: 1, current: 2, channel: 3, seq: null },
	timeUnit: 'iso',
	timeZone: 'UTC',
	currentUnit: 'mA',
	channelDefault: 1
};

describe('validateRow', () => {
	it('accepts a good row exactly as written (no rounding of the ratio)', () => {
		expect(validateRow(['2026-03-04T05:06:07.250Z', '1.023456789', '1.000', '2'], mapping, 7)).toEqual({
			ok: true,
			reading: { seq: null, timeMs: T, ratio: 1.023456789, currentMilliAmpere: 1, channel: 2 }
		});
	});

	it('converts a current in A to mA and takes the default channel when none is mapped', () => {
		const m = { ...mapping, currentUnit: 'A' as const, columns: { ...mapping.columns, channel: null, seq: 3 } };
		expect(validateRow(['2026-03-04T05:06:07.250Z', '0.25', '0.0014142', '12'], m, 2)).toEqual({
			ok: true,
			reading: { seq: 12, timeMs: T, ratio: 0.25, currentMilliAmpere: 1.4142, channel: 1 }
		});
	});

	it('names the line, the column and the reason of each bad value', () => {
		const r = validateRow(['yesterday', 'x1.02', '', '99'], mapping, 41);
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(r.problems.map((p) => [p.line, p.field])).toEqual([
			[41, 'time'],
			[41, 'ratio'],
			[41, 'current'],
			[41, 'channel']
		]);
		expect(r.problems[1].reason).toContain('not a number');
		expect(r.problems[2].reason).toBe('empty');
		expect(r.problems[3].reason).toContain('0–63');
	});

	it('refuses out-of-range ratio and current (a unit mistake) and a short row', () => {
		const bad = (fields: string[]) => {
			const r = validateRow(fields, mapping, 3);
			return r.ok ? [] : r.problems.map((p) => p.field);
		};
		expect(bad(['2026-03-04T05:06:07Z', '-1', '1', '1'])).toEqual(['ratio']);
		expect(bad(['2026-03-04T05:06:07Z', '0', '1', '1'])).toEqual(['ratio']);
		expect(bad(['2026-03-04T05:06:07Z', '1.02', '1000', '1'])).toEqual(['current']);
		expect(bad(['2026-03-04T05:06:07Z', '1.02', '1', '1.5'])).toEqual(['channel']);
		expect(bad(['2026-03-04T05:06:07Z', '1.02'])).toEqual(['row']);
		const m = { ...mapping, columns: { ...mapping.columns, seq: 4 } };
		const r = validateRow(['2026-03-04T05:06:07Z', '1.02', '1', '1', '-3'], m, 3);
		expect(r.ok ? null : r.problems[0]).toEqual({ line: 3, field: 'seq', reason: 'seq must be a whole number ≥ 0' });
	});
});

describe('mapping helpers', () => {
	it('refuses a column mapped twice and a named time zone', () => {
		expect(mappingSchema.safeParse(mapping).success).toBe(true);
		expect(mappingSchema.safeParse({ ...mapping, columns: { ...mapping.columns, current: 1 } }).success).toBe(false);
		expect(mappingSchema.safeParse({ ...mapping, timeZone: 'Europe/Rome' }).success).toBe(false);
	});

	it('guesses columns from header names and the time unit from a sample', () => {
		expect(guessColumns(['seq', 'UTC time', 'Ratio', 'Current (mA)', 'Channel'])).toEqual({ time: 1, ratio: 2, current: 3, channel: 4, seq: 0 });
		expect(guessColumns(['a', 'b', 'c'])).toEqual({ time: 0, ratio: 1, current: 2, channel: null, seq: null });
		expect(guessTimeUnit('2026-03-04T05:06:07Z')).toBe('iso');
		expect(guessTimeUnit('1772600767.25')).toBe('epoch-s');
		expect(guessTimeUnit('1772600767250')).toBe('epoch-ms');
	});

	it('skips blank and comment lines', () => {
		expect(isSkippableRow([''])).toBe(true);
		expect(isSkippableRow(['# bridge log v2'])).toBe(true);
		expect(isSkippableRow(['2026-03-04', '1'])).toBe(false);
	});
});
