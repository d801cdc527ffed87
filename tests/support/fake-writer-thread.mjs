// A stand-in for the writer thread (src/lib/server/ingest/writer-thread.ts) that speaks its message
// protocol without SQLite, for the unit test of the main thread's side: every submission is "stored"
// whole, its rows handed back as a commit; a submission to run 666 makes the thread die unanswered.
import { parentPort } from 'node:worker_threads';

parentPort.on('message', (m) => {
	if (m.type === 'close') return parentPort.postMessage({ type: 'closed' });
	if (m.type !== 'submit') return;
	const b = m.buf;
	const ok = [];
	for (let o = 0; o < b.length; ) {
		const id = b[o];
		const runId = b[o + 1];
		const n = b[o + 3];
		const from = o + 4;
		o = from + n * 5;
		if (runId === 666) process.exit(1);
		parentPort.postMessage({ type: 'commit', runs: [{ runId, rows: b.slice(from, o) }] });
		ok.push(id, n, 0, n > 0 ? b[o - 5] : -1, 0);
	}
	parentPort.postMessage({ type: 'results', ok: new Float64Array(ok), failed: [] });
});
