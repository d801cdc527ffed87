import { describe, expect, it } from 'vitest';
import { BUSY_ROWS_PER_S, columnsToReadings, handoffAfter, packRows, PACKED_STRIDE, Reducer, REDUCER_CHUNK, type ReducerUpdate } from './reducer';
import { ingestTestDb } from './test-db';

const waitFor = async (pred: () => boolean, ms = 5000) => {
	const end = Date.now() + ms;
	while (!pred()) {
		if (Date.now() > end) throw new Error('timed out');
		await new Promise((r) => setTimeout(r, 5));
	}
};

describe('Reducer (reduction + plateau tracker, fed from storage)', () => {
	it('rebuilds a recording run from stored readings in chunks, in seq order, flagging time going backwards', async () => {
		const { sqlite, runId } = await ingestTestDb();
		const n = REDUCER_CHUNK * 2 + 10;
		const ins = sqlite.prepare('insert into reading values (?, ?, ?, ?, 1, 1)');
		sqlite.transaction(() => {
			for (let i = 0; i < n; i++) ins.run(runId, i, 1_000_000 + i * 1000 - (i === 50 ? 5000 : 0), 1.14265 * (1 + (i % 5) * 1e-9), );
		})();
		sqlite.prepare('update run set highest_seq = ?, reading_count = ? where id = ?').run(n - 1, n, runId);
		const updates: ReducerUpdate[] = [];
		const reducer = new Reducer(sqlite, (u) => updates.push(u));
		reducer.loadRecording();
		await waitFor(() => updates.reduce((s, u) => s + u.columns.seq.length, 0) === n);
		expect(updates.length).toBeGreaterThanOrEqual(3); // chunked, with yields between
		const all = updates.flatMap((u) => columnsToReadings(u.columns, u.problem));
		expect(all.map((r) => r.seq)).toEqual(Array.from({ length: n }, (_, i) => i));
		expect(all.filter((r) => r.timeBackwards).map((r) => r.seq)).toEqual([50]);
		expect(updates[0].summary.detector?.rebuilding).toBe(true);
		const last = updates[updates.length - 1].summary;
		expect(last.detector).toMatchObject({ rebuilding: false });
		expect(last.detector!.readings).toBe(n - 1); // the backwards reading is kept out of the detector
		expect(last.readingCount).toBe(n);
	});

	it('picks up new readings on notify and ignores runs that are not recording', async () => {
		const { sqlite, runId, makeRun } = await ingestTestDb();
		const updates: ReducerUpdate[] = [];
		const reducer = new Reducer(sqlite, (u) => updates.push(u));
		const finished = makeRun('finished');
		sqlite.prepare('insert into reading values (?, 0, 1000, 1.14265, 1, 1)').run(finished);
		reducer.notify(finished);
		sqlite.prepare('insert into reading values (?, 0, 1000, 1.14265, 1, 1), (?, 1, 2000, 1.14265, 1, 1)').run(runId, runId);
		reducer.notify(runId);
		await waitFor(() => updates.length > 0);
		await new Promise((r) => setTimeout(r, 20));
		expect(updates.map((u) => u.runId)).toEqual([runId]);
		expect(Array.from(updates[0].columns.seq)).toEqual([0, 1]);
		expect(updates[0].columns.t90Kelvin[0]).toBeGreaterThan(302);
	});

	it('takes a caught-up run\'s new rows from the hand-over, and reads storage while it is not caught up', async () => {
		const { sqlite, runId } = await ingestTestDb();
		const updates: ReducerUpdate[] = [];
		const reducer = new Reducer(sqlite, (u) => updates.push(u));
		const row = (seq: number) => ({ seq, timeMs: 1_000_000 + seq * 1000, ratio: 1.14265, currentMilliAmp: 1, channel: 1 });
		const ins = sqlite.prepare('insert into reading values (?, ?, ?, ?, 1, 1)');
		for (const r of [row(0), row(1)]) ins.run(runId, r.seq, r.timeMs, r.ratio);
		// Not caught up yet (never read): the hand-over is not trusted, storage is read.
		reducer.notify(runId, packRows([row(0), row(1), row(7)]));
		await waitFor(() => updates.length === 1);
		expect(Array.from(updates[0].columns.seq)).toEqual([0, 1]);
		// Caught up: rows come from the hand-over. Seq 5 is handed over but not in storage, which shows
		// that the stage did not read it back.
		reducer.notify(runId, packRows([row(2), row(5)]));
		await waitFor(() => updates.length === 2);
		expect(Array.from(updates[1].columns.seq)).toEqual([2, 5]);
		expect(updates[1].columns.t90Kelvin[1]).toBeGreaterThan(302);
		// A notify without rows (readings stored by another path) sends the cursor back to storage.
		for (const r of [row(6), row(8)]) ins.run(runId, r.seq, r.timeMs, r.ratio);
		reducer.notify(runId);
		await waitFor(() => updates.length === 3);
		expect(Array.from(updates[2].columns.seq)).toEqual([6, 8]);
	});

	it('hand-over: only seqs above the cursor, in seq order, at most the chunk, the rest kept', () => {
		const pack = (seqs: number[]) => packRows(seqs.map((seq) => ({ seq, timeMs: seq * 10, ratio: 1 + seq, currentMilliAmp: 1, channel: 2 })));
		const seqs = (a: Float64Array) => Array.from({ length: a.length / PACKED_STRIDE }, (_, i) => a[i * PACKED_STRIDE]);
		const restSeqs = (rest: Float64Array[]) => rest.flatMap(seqs);
		const inOrder = handoffAfter([pack([3, 4]), pack([5, 6])], 2, 100);
		expect(seqs(inOrder.rows)).toEqual([3, 4, 5, 6]);
		expect(inOrder.rest).toEqual([]);
		// In order but more than the chunk: the first rows, the rest kept as it came (split inside a chunk).
		const long = handoffAfter([pack([3, 4, 5]), pack([6, 7]), pack([8])], 2, 4);
		expect(seqs(long.rows)).toEqual([3, 4, 5, 6]);
		expect(long.rest.map(seqs)).toEqual([[7], [8]]);
		expect(Array.from(long.rows.subarray(3 * PACKED_STRIDE, 4 * PACKED_STRIDE))).toEqual([6, 60, 7, 1, 2]);
		const next = handoffAfter(long.rest, 6, 4);
		expect(seqs(next.rows)).toEqual([7, 8]);
		expect(next.rest).toEqual([]);
		// Rows at or below the cursor are dropped on the in-order path too.
		expect(seqs(handoffAfter([pack([1, 2, 3])], 2, 10).rows)).toEqual([3]);
		const mixed = handoffAfter([pack([3, 9, 4]), pack([2, 8, 1])], 2, 3);
		expect(seqs(mixed.rows)).toEqual([3, 4, 8]);
		expect(restSeqs(mixed.rest)).toEqual([9]);
		// every field travels with its seq
		expect(Array.from(mixed.rows.subarray(PACKED_STRIDE, 2 * PACKED_STRIDE))).toEqual([4, 40, 5, 1, 2]);
	});

	it('counts the ingest as busy only while rows arrive faster than live benches make them', async () => {
		const { sqlite, runId } = await ingestTestDb();
		const reducer = new Reducer(sqlite, () => {});
		const rows = (from: number, n: number) => packRows(Array.from({ length: n }, (_, i) => ({ seq: from + i, timeMs: 1_000 + from + i, ratio: 1.14265, currentMilliAmp: 1, channel: 1 })));
		// Fifty benches at ten readings a second, in 50 ms: far below the limit.
		for (let b = 0; b < 50; b++) reducer.notify(runId, rows(b, 1));
		expect(reducer.ingestBusy()).toBe(false);
		// A replay: 500-reading batches back to back, past BUSY_ROWS_PER_S within one window.
		const perWindow = (BUSY_ROWS_PER_S * 100) / 1000;
		for (let i = 0; i * 500 <= perWindow; i++) reducer.notify(runId, rows(100 + i * 500, 500));
		expect(reducer.ingestBusy()).toBe(true);
		// and quiet again a little after the burst
		expect(reducer.ingestBusy(performance.now() + 300)).toBe(false);
		reducer.drop(runId);
	});

	it('reduces every stored reading exactly once, in seq order, whatever mix of hand-over and storage it meets', async () => {
		const { sqlite, runId } = await ingestTestDb();
		const updates: ReducerUpdate[] = [];
		const reducer = new Reducer(sqlite, (u) => updates.push(u));
		const ins = sqlite.prepare('insert or ignore into reading values (?, ?, ?, ?, 1, 1)');
		let seed = 7;
		const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
		let next = 0;
		for (let batch = 0; batch < 60; batch++) {
			const n = 1 + Math.floor(rand() * (batch % 10 === 0 ? 3000 : 40));
			const rows = Array.from({ length: n }, (_, i) => ({ seq: next + i, timeMs: 1_000_000 + (next + i) * 1000, ratio: 1.14265, currentMilliAmp: 1, channel: 1 }));
			next += n;
			sqlite.transaction(() => rows.forEach((r) => ins.run(runId, r.seq, r.timeMs, r.ratio)))();
			sqlite.prepare('update run set highest_seq = ?, reading_count = ? where id = ?').run(next - 1, next, runId);
			reducer.notify(runId, packRows(rows));
			if (rand() < 0.3) await new Promise((r) => setTimeout(r, 1));
		}
		await waitFor(() => updates.reduce((s, u) => s + u.columns.seq.length, 0) >= next);
		await new Promise((r) => setTimeout(r, 30));
		const all = updates.flatMap((u) => Array.from(u.columns.seq));
		expect(all).toEqual(Array.from({ length: next }, (_, i) => i));
	});
});
