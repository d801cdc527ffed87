import { describe, expect, it } from 'vitest';
import { ingestTestDb } from './test-db';
import { GroupCommitWriter, type CommittedRun } from './writer';
import type { ValidReading } from './validate';

const rd = (seq: number, timeMs = 1_000 + seq): ValidReading => ({ seq, timeMs, ratio: 1.1426485 + seq * 1e-9, currentMilliAmp: 1, channel: 1 });
const range = (from: number, n: number) => Array.from({ length: n }, (_, i) => rd(from + i));

async function setup(windowMs = 3, maxRows = 4000) {
	const t = await ingestTestDb();
	const commits: CommittedRun[][] = [];
	const writer = new GroupCommitWriter(t.sqlite, { windowMs, maxRows, lastUsedIntervalMs: 5000, onCommit: (runs) => commits.push(runs) });
	const count = (runId = t.runId) => (t.sqlite.prepare('select count(*) as n from reading where run_id = ?').get(runId) as { n: number }).n;
	const run = (runId = t.runId) => t.sqlite.prepare('select reading_count, highest_seq, last_reading_at from run where id = ?').get(runId) as { reading_count: number; highest_seq: number; last_reading_at: number | null };
	return { ...t, writer, commits, count, run };
}

describe('GroupCommitWriter', () => {
	it('commits submissions that arrive within the window in one transaction, and answers only afterwards', async () => {
		const { writer, commits, count, runId, run } = await setup(20);
		let answered = 0;
		const a = writer.write(runId, null, range(0, 150)).then((r) => (answered++, r));
		const b = writer.write(runId, null, range(150, 50)).then((r) => (answered++, r));
		// Nothing is stored or answered before the window closes.
		expect(count()).toBe(0);
		await new Promise((r) => setTimeout(r, 5));
		expect(answered).toBe(0);
		const [ra, rb] = await Promise.all([a, b]);
		expect(commits).toHaveLength(1);
		expect(ra).toMatchObject({ ok: true, accepted: 150, duplicates: 0, highestDurableSeq: 199 });
		expect(rb).toMatchObject({ ok: true, accepted: 50, duplicates: 0, highestDurableSeq: 199 });
		expect(count()).toBe(200);
		expect(run()).toMatchObject({ reading_count: 200, highest_seq: 199 });
		expect(run().last_reading_at).not.toBeNull();
	});

	it('closes a group early at the row cap', async () => {
		const { writer, commits, runId } = await setup(1000, 300);
		const t0 = Date.now();
		await writer.write(runId, null, range(0, 300));
		expect(Date.now() - t0).toBeLessThan(500);
		expect(commits).toHaveLength(1);
	});

	it('counts duplicates (already stored, or repeated in the batch) without storing them again', async () => {
		const { writer, commits, count, runId, run } = await setup();
		await writer.write(runId, null, range(0, 10));
		const again = await writer.write(runId, null, [...range(5, 10), rd(14), rd(20), rd(3)]);
		expect(again).toMatchObject({ ok: true, accepted: 6, duplicates: 7, highestDurableSeq: 20 });
		expect(commits.at(-1)!.flatMap((c) => c.stored.map((r) => r.seq))).toEqual([10, 11, 12, 13, 14, 20]);
		expect(count()).toBe(16);
		expect(run()).toMatchObject({ reading_count: 16, highest_seq: 20 });
	});

	it('fills a gap below the highest seq (slow path) and takes the fast path for long batches', async () => {
		const { writer, count, runId } = await setup();
		await writer.write(runId, null, [...range(0, 250), ...range(300, 250)]);
		const gap = await writer.write(runId, null, range(250, 50));
		expect(gap).toMatchObject({ ok: true, accepted: 50, duplicates: 0, highestDurableSeq: 549 });
		expect(count()).toBe(550);
	});

	it('refuses readings for a run that is not recording, checked inside the write transaction', async () => {
		const { writer, count, runId, makeRun, sqlite } = await setup();
		const finished = makeRun('finished');
		const [ok, refused] = await Promise.all([writer.write(runId, null, range(0, 5)), writer.write(finished, null, range(0, 5))]);
		expect(ok.ok).toBe(true);
		expect(refused).toMatchObject({ ok: false, code: 'run_not_recording' });
		expect(count(finished)).toBe(0);
		sqlite.prepare("update run set state = 'finished' where id = ?").run(runId);
		expect(await writer.write(runId, null, range(5, 5))).toMatchObject({ ok: false, code: 'run_not_recording' });
		expect(count()).toBe(5);
		expect(await writer.write(9999, null, range(0, 1))).toMatchObject({ ok: false, code: 'run_not_found' });
	});

	it('waits while the shared handle is inside someone else’s transaction, so its rows never join it', async () => {
		const { writer, count, runId, sqlite } = await setup(1);
		sqlite.exec('begin');
		sqlite.prepare("insert into lab_setting (key, value_json) values ('x', '1')").run();
		const pending = writer.write(runId, null, range(0, 3));
		await new Promise((r) => setTimeout(r, 20));
		sqlite.exec('rollback');
		expect(await pending).toMatchObject({ ok: true, accepted: 3 });
		expect(count()).toBe(3);
		expect(sqlite.prepare("select count(*) as n from lab_setting where key = 'x'").get()).toEqual({ n: 0 });
	});

	it('writes bench_token.last_used_at at most once per interval', async () => {
		const { writer, runId, sqlite } = await setup();
		sqlite.prepare("insert into bench_token (id, bench_id, token_hash, token_hint, created_at) values (7, 1, 'h', 'spb_…x', 0)").run();
		await writer.write(runId, 7, range(0, 1));
		const first = (sqlite.prepare('select last_used_at from bench_token where id = 7').get() as { last_used_at: number }).last_used_at;
		expect(first).toBeGreaterThan(0);
		await new Promise((r) => setTimeout(r, 5));
		await writer.write(runId, 7, range(1, 1));
		const second = (sqlite.prepare('select last_used_at from bench_token where id = 7').get() as { last_used_at: number }).last_used_at;
		expect(second).toBe(first);
	});

	it('writes what is queued on close and refuses later submissions', async () => {
		const { writer, runId, count } = await setup(1000);
		const p = writer.write(runId, null, range(0, 4));
		await writer.close();
		expect(await p).toMatchObject({ ok: true, accepted: 4 });
		expect(count()).toBe(4);
		expect(await writer.write(runId, null, range(4, 1))).toMatchObject({ ok: false, code: 'shutting_down' });
	});

	it('answers a WAL commit only after the fsync that follows it, one fsync for the groups committed meanwhile', async () => {
		const t = await ingestTestDb();
		const syncs: ((e: Error | null) => void)[] = [];
		const writer = new GroupCommitWriter(t.sqlite, { windowMs: 1, maxRows: 4000, lastUsedIntervalMs: 5000, syncWal: (done) => syncs.push(done) });
		let answered = 0;
		const a = writer.write(t.runId, null, range(0, 10)).then((r) => (answered++, r));
		await new Promise((r) => setTimeout(r, 10));
		// Committed (a reader sees the rows) but not answered: the fsync has not come back.
		expect((t.sqlite.prepare('select count(*) as n from reading').get() as { n: number }).n).toBe(10);
		expect(syncs).toHaveLength(1);
		expect(answered).toBe(0);
		// Two more groups commit while that fsync is in flight; they wait for one fsync started after them.
		const b = writer.write(t.runId, null, range(10, 5)).then((r) => (answered++, r));
		await new Promise((r) => setTimeout(r, 10));
		const c = writer.write(t.runId, null, range(15, 5)).then((r) => (answered++, r));
		await new Promise((r) => setTimeout(r, 10));
		expect(syncs).toHaveLength(1);
		syncs[0](null);
		expect(await a).toMatchObject({ ok: true, accepted: 10 });
		expect(answered).toBe(1);
		expect(syncs).toHaveLength(2);
		syncs[1](null);
		expect(await Promise.all([b, c])).toMatchObject([{ ok: true, accepted: 5 }, { ok: true, accepted: 5, highestDurableSeq: 19 }]);
		expect(writer.stats.walSyncs).toBe(2);
	});

	it('with overlapping fsyncs and no window: one fsync per group at once, each answering only the groups before it', async () => {
		const t = await ingestTestDb();
		const syncs: ((e: Error | null) => void)[] = [];
		const writer = new GroupCommitWriter(t.sqlite, { windowMs: 0, overlappingSyncs: true, maxRows: 4000, lastUsedIntervalMs: 5000, syncWal: (done) => syncs.push(done) });
		const answered: string[] = [];
		const a = writer.write(t.runId, null, range(0, 10)).then((r) => (answered.push('a'), r));
		await new Promise((r) => setImmediate(r));
		await new Promise((r) => setImmediate(r));
		expect(syncs).toHaveLength(1); // committed in the next turn of the loop: no window
		const b = writer.write(t.runId, null, range(10, 5)).then((r) => (answered.push('b'), r));
		await new Promise((r) => setTimeout(r, 5));
		expect(syncs).toHaveLength(2); // started while the first is in flight
		// The later fsync returns first: it answers b only; a waits for its own.
		syncs[1](null);
		expect(await b).toMatchObject({ ok: true, accepted: 5, highestDurableSeq: 14 });
		expect(answered).toEqual(['b']);
		const closing = writer.close();
		let closed = false;
		void closing.then(() => (closed = true));
		await new Promise((r) => setTimeout(r, 5));
		expect(closed).toBe(false); // close waits for every fsync in flight
		syncs[0](null);
		expect(await a).toMatchObject({ ok: true, accepted: 10 });
		await closing;
		expect(answered).toEqual(['b', 'a']);
	});

	it('answers storage_error when the fsync fails, and a resend then meets the rows as duplicates', async () => {
		const t = await ingestTestDb();
		let fail = true;
		const writer = new GroupCommitWriter(t.sqlite, { windowMs: 1, maxRows: 4000, lastUsedIntervalMs: 5000, syncWal: (done) => setImmediate(() => done(fail ? new Error('EIO: i/o error, fsync') : null)) });
		expect(await writer.write(t.runId, null, range(0, 4))).toMatchObject({ ok: false, code: 'storage_error', message: expect.stringContaining('EIO') });
		fail = false;
		expect(await writer.write(t.runId, null, range(0, 4))).toMatchObject({ ok: true, accepted: 0, duplicates: 4, highestDurableSeq: 3 });
	});

	it('counts readings stored with a time earlier than one the run already had, across batches and writers', async () => {
		const { writer, runId, sqlite } = await setup();
		// seq 3 goes back in time within the batch; seq 2 (a duplicate of nothing yet) is stored in order.
		const first = [rd(0, 100), rd(1, 200), rd(2, 300), rd(3, 150), rd(4, 400)];
		expect(await writer.write(runId, null, first)).toMatchObject({ ok: true, accepted: 5, timeBackwards: 1 });
		// Against what was stored before: 350 < 400; duplicates are not counted (not stored).
		expect(await writer.write(runId, null, [rd(4, 10), rd(5, 350), rd(6, 500)])).toMatchObject({ ok: true, accepted: 2, duplicates: 1, timeBackwards: 1 });
		await writer.close();
		// A new writer (a restart) learns the run's latest time from storage.
		const again = new GroupCommitWriter(sqlite, { windowMs: 3, maxRows: 4000, lastUsedIntervalMs: 5000 });
		expect(await again.write(runId, null, [rd(7, 499), rd(8, 501)])).toMatchObject({ ok: true, accepted: 2, timeBackwards: 1 });
		await again.close();
	});

	it('counts timeBackwards once when a group is written again on the row-by-row path', async () => {
		const { writer, runId, sqlite, count } = await setup();
		// A row the writer does not know of (stored by another path, run.highest_seq not moved on): the
		// fast path meets it, the transaction is rolled back and the group written again row by row.
		sqlite.prepare('insert into reading (run_id, seq, time_ms, ratio, current_ma, channel) values (?, 150, 5000, 1.14, 1, 1)').run(runId);
		const readings = [...range(0, 200).map((r) => ({ ...r, timeMs: 10_000 + r.seq })), rd(200, 9_000)];
		expect(await writer.write(runId, null, readings)).toMatchObject({ ok: true, accepted: 200, duplicates: 1, timeBackwards: 1 });
		expect(count()).toBe(201);
		await writer.close();
	});

	it('fsyncs the real -wal file by default and keeps the connection at synchronous=NORMAL', async () => {
		const { writer, runId, sqlite } = await setup();
		const calls: string[] = [];
		const original = sqlite.pragma.bind(sqlite);
		sqlite.pragma = ((source: string, options?: { simple?: boolean }) => (calls.push(source), original(source, options))) as typeof sqlite.pragma;
		expect(await writer.write(runId, null, range(0, 2))).toMatchObject({ ok: true, accepted: 2 });
		expect(writer.stats.walSyncs).toBe(1);
		expect(calls.filter((c) => c.startsWith('synchronous'))).toEqual([]);
		expect(original('synchronous', { simple: true })).toBe(1);
		// The per-row foreign-key lookup is off for the write transaction only (the run is checked in it).
		expect(calls.filter((c) => c.startsWith('foreign_keys ='))).toEqual(['foreign_keys = OFF', 'foreign_keys = ON']);
		expect(original('foreign_keys', { simple: true })).toBe(1);
		await writer.close();
	});

	it('without a WAL to fsync, commits at synchronous=FULL and puts NORMAL back afterwards', async () => {
		const t = await ingestTestDb();
		const writer = new GroupCommitWriter(t.sqlite, { windowMs: 3, maxRows: 4000, lastUsedIntervalMs: 5000, syncWal: null });
		const calls: string[] = [];
		const original = t.sqlite.pragma.bind(t.sqlite);
		t.sqlite.pragma = ((source: string, options?: { simple?: boolean }) => (calls.push(source), original(source, options))) as typeof t.sqlite.pragma;
		await writer.write(t.runId, null, range(0, 2));
		expect(calls.filter((c) => c.startsWith('synchronous'))).toEqual(['synchronous = FULL', 'synchronous = NORMAL']);
		expect(original('synchronous', { simple: true })).toBe(1); // NORMAL for everything else
		expect(writer.stats.walSyncs).toBe(0);
	});
});
