import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { packResults, packSubmissions, unpackResults, unpackSubmissions, type PackedSubmission } from './writer-thread';

// The messages between the main thread and the writer thread carry every reading as float64: the
// fields of a valid reading (integers up to 2^53, finite doubles) must come back exactly.
const reading = fc.record({
	seq: fc.nat({ max: Number.MAX_SAFE_INTEGER }),
	timeMs: fc.integer({ min: 0, max: 8.64e15 }),
	ratio: fc.double({ min: 0, max: 10, noNaN: true }),
	currentMilliAmp: fc.double({ min: 0, max: 50, noNaN: true }),
	channel: fc.integer({ min: 1, max: 64 })
});
const submission = fc.record({
	id: fc.nat({ max: 2 ** 40 }),
	runId: fc.integer({ min: 1, max: 2 ** 40 }),
	tokenId: fc.option(fc.integer({ min: 1, max: 2 ** 40 }), { nil: null }),
	readings: fc.array(reading, { maxLength: 40 })
});

describe('writer thread messages', () => {
	it('submissions come back exactly, in order, with an absent token kept absent', () => {
		fc.assert(
			fc.property(fc.array(submission, { maxLength: 12 }), (subs: PackedSubmission[]) => {
				expect(unpackSubmissions(packSubmissions(subs))).toEqual(subs);
			})
		);
	});

	it('an empty submission list packs to nothing', () => {
		expect(packSubmissions([]).length).toBe(0);
		expect(unpackSubmissions(new Float64Array(0))).toEqual([]);
	});

	it('results come back exactly', () => {
		const result = fc.record({ ok: fc.constant(true as const), accepted: fc.nat(), duplicates: fc.nat(), highestDurableSeq: fc.integer({ min: -1, max: Number.MAX_SAFE_INTEGER }), timeBackwards: fc.nat() });
		fc.assert(
			fc.property(fc.array(fc.record({ id: fc.nat({ max: 2 ** 40 }), result }), { maxLength: 20 }), (results) => {
				expect(unpackResults(packResults(results))).toEqual(results);
			})
		);
	});
});
