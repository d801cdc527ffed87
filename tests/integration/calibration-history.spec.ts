import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type SQLite from 'better-sqlite3';
import type { Kysely } from 'kysely';
import { createKysely, openSqlite } from '../../src/lib/server/db/index';
import type { Database } from '../../src/lib/server/db/schema';
import { cellHistory, compareCells, immersionOf, realizations } from '../../src/lib/server/compare/index';
import { seededDatabase } from '../support/server';

let sqlite: SQLite.Database;
let db: Kysely<Database>;
let cellIds: Record<string, number>;

beforeAll(async () => {
	const { dbPath, seed } = await seededDatabase(undefined, { pastRuns: true });
	sqlite = openSqlite(dbPath);
	db = createKysely(sqlite);
	cellIds = seed.cellIds;
}, 120_000);

afterAll(async () => {
	await db?.destroy();
});

/** The stored plateau value of each finished run of a cell, read straight from run.analysis_json. */
function storedValues(cellId: number): number[] {
	const rows = sqlite.prepare("select analysis_json from run where cell_id = ? and state = 'finished' and analysis_json is not null").all(cellId) as { analysis_json: string }[];
	return rows.map((r) => (JSON.parse(r.analysis_json) as { analysis: { result: { deltaMilliKelvin: number } | null } }).analysis?.result?.deltaMilliKelvin).filter((v): v is number => typeof v === 'number');
}

describe('cell history control chart on the demo data, against a hand computation', () => {
	for (const serial of ['KV-Sn-11', 'KV-Zn-05']) {
		it(`${serial}: mean, σ and the ±2σ / ±3σ limits`, async () => {
			const h = await cellHistory(db, sqlite, cellIds[serial]);
			// the chart's computation has now cached every run's analysis: read the stored numbers back
			const values = storedValues(cellIds[serial]);
			expect(values.length).toBe(h.chart.n);
			expect(values.length).toBeGreaterThanOrEqual(3);
			// by hand, differently: the mean from a running sum in storage order, and the variance from the
			// pairwise differences, s² = Σ_{i<j} (x_i − x_j)² / (n (n − 1)), which needs no mean at all
			const n = values.length;
			let sum = 0;
			for (const v of values) sum += v;
			const mean = sum / n;
			let pairs = 0;
			for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) pairs += (values[i] - values[j]) ** 2;
			const sigma = Math.sqrt(pairs / (n * (n - 1)));
			expect(h.chart.mean!).toBeCloseTo(mean, 10);
			expect(h.chart.sigma!).toBeCloseTo(sigma, 10);
			expect(h.chart.warning!.upper).toBeCloseTo(mean + 2 * sigma, 10);
			expect(h.chart.warning!.lower).toBeCloseTo(mean - 2 * sigma, 10);
			expect(h.chart.action!.upper).toBeCloseTo(mean + 3 * sigma, 10);
			expect(h.chart.action!.lower).toBeCloseTo(mean - 3 * sigma, 10);
			for (const p of h.chart.points) {
				const z = Math.abs(p.y - mean) / sigma;
				expect(p.flag).toBe(z > 3 ? 'action' : z > 2 ? 'warning' : 'in');
			}
			// points are in time order
			const xs = h.chart.points.map((p) => p.x);
			expect(xs).toEqual([...xs].sort((a, b) => a - b));
		}, 60_000);
	}

	it('KV-Zn-05 against KV-Zn-09 with the same SPRT: difference and quadrature uncertainty', async () => {
		const a = (await realizations(db, sqlite, cellIds['KV-Zn-05'])).realizations;
		const b = (await realizations(db, sqlite, cellIds['KV-Zn-09'])).realizations;
		const [pair] = compareCells(a, b);
		expect(pair.thermometerSerial).toBe('KV-S-4471');
		expect(pair.differenceMilliKelvin).toBeCloseTo(pair.a.valueMilliKelvin - pair.b.valueMilliKelvin, 12);
		expect(pair.uMilliKelvin).toBeCloseTo(Math.hypot(pair.a.uMilliKelvin, pair.b.uMilliKelvin), 12);
		// the newest KV-Zn-05 run and the KV-Zn-09 run five days later
		expect(pair.daysApart).toBeCloseTo(5, 0);
	});

	it('the demo immersion test follows the zinc line of ITS-90 Table 2 (2.7 mK/m) within 0.1 mK', async () => {
		const run = sqlite.prepare("select distinct run_id as id from run_event where kind = 'immersion-step'").get() as { id: number };
		const r = await immersionOf(db, sqlite, run.id, 0.1);
		expect(r.driftSource).toBe('return to the deepest step');
		const p = r.profile!;
		expect(p.points.map((x) => Math.round(x.depthMetre * 1000))).toEqual([180, 170, 160, 150, 140, 130]);
		expect(p.points[5].expectedMilliKelvin).toBeCloseTo(-2.7 * 0.05, 10);
		expect(p.follows).toBe(true);
	}, 60_000);
});
