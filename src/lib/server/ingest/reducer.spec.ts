import { describe, expect, it } from 'vitest';
import { columnsToReadings, Reducer, REDUCER_CHUNK, type ReducerUpdate } from './reducer';
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
});
