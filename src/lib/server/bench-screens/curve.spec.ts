import { describe, expect, it } from 'vitest';
import { ingestTestDb } from '../ingest/test-db';
import { runCurve } from './curve';

async function runWith(n: number) {
	const t = await ingestTestDb({ state: 'finished' });
	const insert = t.sqlite.prepare('insert into reading (run_id, seq, time_ms, ratio, current_ma, channel) values (?, ?, ?, ?, ?, 1)');
	const base = 1.1181; // near the gallium point for this thermometer and resistor
	t.sqlite.transaction(() => {
		for (let i = 0; i < n; i++) {
			// a slow ramp, one spike at i = 777, a raised current for the second tenth
			const spike = i === 777 ? 5e-6 : 0;
			insert.run(t.runId, i, 1_000_000 + i * 1000, base + i * 1e-9 + spike, i >= n / 10 && i < n / 5 ? 1.414 : 1);
		}
	})();
	return t;
}

describe('the run chart curve', () => {
	it('returns every reading of a short range, reduced', async () => {
		const t = await runWith(500);
		const c = runCurve(t.sqlite, t.runId, { points: 1500 })!;
		expect(c.detail).toBe('raw');
		expect(c.t).toHaveLength(500);
		expect(c.throughSeq).toBe(499);
		expect(c.d.every((v) => v !== null && Number.isFinite(v))).toBe(true);
	});

	it('keeps a spike through min/max buckets, and matches the raw extremes', async () => {
		const t = await runWith(20_000);
		const raw = runCurve(t.sqlite, t.runId, { points: 20_000 })!;
		const mm = runCurve(t.sqlite, t.runId, { points: 500 })!;
		expect(mm.detail).toBe('minmax');
		expect(mm.t.length).toBeLessThanOrEqual(1000);
		const max = (xs: (number | null)[]) => Math.max(...xs.map((v) => v ?? -Infinity));
		expect(max(mm.d)).toBeCloseTo(max(raw.d), 4);
		expect(mm.i.some((i) => i > 1.4)).toBe(true);
		for (let j = 1; j < mm.t.length; j++) expect(mm.t[j]).toBeGreaterThan(mm.t[j - 1]);
	});

	it('serves a time range, and a sampled first look', async () => {
		const t = await runWith(20_000);
		const part = runCurve(t.sqlite, t.runId, { fromMs: 1_000_000 + 5000 * 1000, toMs: 1_000_000 + 5999 * 1000 })!;
		expect(part.detail).toBe('raw');
		expect(part.t[0]).toBe(1_000_000 + 5000 * 1000);
		expect(part.t.at(-1)).toBe(1_000_000 + 5999 * 1000);
		const s = runCurve(t.sqlite, t.runId, { points: 200, sampled: true })!;
		expect(s.detail).toBe('sampled');
		expect(s.t).toHaveLength(200);
	});
});
