import fc from 'fast-check';
import { describe, expect, it, vi } from 'vitest';
import { packResults, packSubmissions, ThreadWriter, unpackResults, unpackSubmissions, type PackedSubmission } from './writer-thread';
import type { ValidReading } from './validate';

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

describe('ThreadWriter (main side), against a stand-in thread', () => {
	const fake = new URL('../../../../tests/support/fake-writer-thread.mjs', import.meta.url).href;
	const rd = (seq: number): ValidReading => ({ seq, timeMs: 1_000 + seq, ratio: 1.14, currentMilliAmp: 1, channel: 1 });
	const start = () => {
		const commits: { runId: number; seqs: number[] }[] = [];
		let restarts = 0;
		const writer = new ThreadWriter(':unused:', fake, (runId, rows) => commits.push({ runId, seqs: Array.from({ length: rows.length / 5 }, (_, i) => rows[i * 5]) }), { onRestart: () => restarts++ });
		return { writer, commits, restarts: () => restarts };
	};

	it('answers each submission from the thread and hands the committed rows on', async () => {
		const { writer, commits } = start();
		const [a, b] = await Promise.all([writer.write(1, 7, [rd(0), rd(1)]), writer.write(2, null, [rd(5)])]);
		expect(a).toEqual({ ok: true, accepted: 2, duplicates: 0, highestDurableSeq: 1, timeBackwards: 0 });
		expect(b).toEqual({ ok: true, accepted: 1, duplicates: 0, highestDurableSeq: 5, timeBackwards: 0 });
		expect(commits).toEqual([
			{ runId: 1, seqs: [0, 1] },
			{ runId: 2, seqs: [5] }
		]);
		expect(writer.pendingRows).toBe(0);
		await writer.close();
		expect(await writer.write(1, 7, [rd(2)])).toMatchObject({ ok: false, code: 'shutting_down' });
	});

	it('when the thread dies: what it had not answered gets storage_error, a new thread takes what comes next', async () => {
		const logged = vi.spyOn(console, 'error').mockImplementation(() => {});
		const { writer, restarts } = start();
		const lost = writer.write(666, null, [rd(0)]);
		expect(await lost).toMatchObject({ ok: false, code: 'storage_error', message: expect.stringContaining('send them again') });
		// Submitted while there is no thread: kept, and sent once the new one is there.
		const next = writer.write(3, null, [rd(9)]);
		expect(await next).toMatchObject({ ok: true, accepted: 1, highestDurableSeq: 9 });
		expect(restarts()).toBe(1);
		expect(writer.pendingRows).toBe(0);
		expect(logged).toHaveBeenCalledWith(expect.stringContaining('writer thread exited (1); restarting'));
		logged.mockRestore();
		await writer.close();
	});
});
