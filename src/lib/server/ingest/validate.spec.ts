import { describe, expect, it } from 'vitest';
import { checkReading, parseBatchBody, validateBatch, type FieldError } from './validate';

const good = { seq: 3, timeMs: 1_760_000_000_000, ratio: 1.142648563, currentMilliAmp: 1 };

describe('checkReading', () => {
	it('accepts a good reading, keeps the ratio exactly and defaults the channel to 1', () => {
		const errors: FieldError[] = [];
		expect(checkReading(good, errors)).toEqual({ ...good, channel: 1 });
		expect(errors).toEqual([]);
	});

	const cases: [string, Record<string, unknown>, string][] = [
		['seq', { seq: -1 }, 'seq'],
		['seq', { seq: 1.5 }, 'seq'],
		['seq', { seq: '3' }, 'seq'],
		['seq', { seq: 2 ** 60 }, 'seq'],
		['timeMs', { timeMs: 1.5 }, 'timeMs'],
		['timeMs', { timeMs: -5 }, 'timeMs'],
		['timeMs', { timeMs: null }, 'timeMs'],
		['ratio', { ratio: 0 }, 'ratio'],
		['ratio', { ratio: -1.1 }, 'ratio'],
		['ratio', { ratio: null }, 'ratio'],
		['ratio', { ratio: '1.1' }, 'ratio'],
		['currentMilliAmp', { currentMilliAmp: 0 }, 'currentMilliAmp'],
		['currentMilliAmp', { currentMilliAmp: 50.01 }, 'currentMilliAmp'],
		['channel', { channel: 64 }, 'channel'],
		['channel', { channel: 1.5 }, 'channel'],
		['unknown field', { current: 1 }, 'current']
	];
	for (const [what, patch, field] of cases) {
		it(`refuses a bad ${what} (${JSON.stringify(patch)})`, () => {
			const errors: FieldError[] = [];
			expect(checkReading({ ...good, ...patch }, errors)).toBeNull();
			expect(errors.map((e) => e.field)).toEqual([field]);
			expect(errors[0].reason.length).toBeGreaterThan(5);
		});
	}

	it('reports a missing field and every bad field at once', () => {
		const errors: FieldError[] = [];
		expect(checkReading({ seq: 1, ratio: -1 }, errors)).toBeNull();
		expect(errors.map((e) => e.field).sort()).toEqual(['currentMilliAmp', 'ratio', 'timeMs']);
		expect(checkReading([1, 2], (errors.length = 0, errors))).toBeNull();
		expect(errors[0].field).toBe('(reading)');
	});
});

describe('validateBatch and parseBatchBody', () => {
	it('rejects the whole batch with index, seq, field, value and reason per problem', () => {
		const r = validateBatch([good, { ...good, seq: 4, ratio: -1 }, { ...good, seq: 5 }]);
		expect(r).toMatchObject({ ok: false, status: 422, code: 'invalid_readings' });
		if (!r.ok) expect(r.details).toEqual([{ index: 1, seq: 4, field: 'ratio', value: -1, reason: 'must be a finite number > 0' }]);
	});

	it('limits the readings per request (413) and the details listed', () => {
		expect(validateBatch(new Array(5001).fill(good))).toMatchObject({ ok: false, status: 413 });
		const r = validateBatch(new Array(300).fill({ ...good, ratio: 0 }));
		if (r.ok) throw new Error('should fail');
		expect((r.details as unknown[]).length).toBe(100);
		expect(r.message).toContain('300 of 300');
	});

	it('parses JSON and NDJSON bodies, and refuses what is neither', () => {
		expect(parseBatchBody(JSON.stringify({ readings: [good] }), 'json')).toMatchObject({ ok: true, readings: [good] });
		expect(parseBatchBody(`${JSON.stringify(good)}\n\n${JSON.stringify({ ...good, seq: 4 })}\n`, 'ndjson')).toMatchObject({ ok: true });
		expect(parseBatchBody('{"readings": [', 'json')).toMatchObject({ ok: false, status: 400, code: 'invalid_json' });
		expect(parseBatchBody('[1,2]', 'json')).toMatchObject({ ok: false, status: 400, code: 'invalid_body' });
		expect(parseBatchBody(`${JSON.stringify(good)}\nnot json`, 'ndjson')).toMatchObject({ ok: false, status: 400, code: 'invalid_ndjson', details: { line: 2 } });
		expect(parseBatchBody('', 'ndjson')).toMatchObject({ ok: true, readings: [] });
	});
});
