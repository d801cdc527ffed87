// The demo's live benches: each one sets up a run on a demo bench, starts it, and streams a simulated
// realization into the running app exactly as a lab's instrument script would (bench token, public API).
// When a realization ends, the run is finished and, after a pause, the next one begins.
import { runBench, type BenchController } from '../bench-simulator/src/index';
import type { DB } from '../src/lib/server/db/index';
import type { SessionUser } from '../src/lib/server/auth/types';
import { createRun, transitionRun } from '../src/lib/server/repositories/run-lifecycle';
import { createBenchToken } from '../src/lib/server/tokens/index';
import { demoEquipmentOverrides } from '../src/lib/server/demo/history';
import { DEMO_CELLS, DEMO_RESISTORS, DEMO_THERMOMETERS } from '../src/lib/server/demo/scenario';
import type { RunKind } from '../src/lib/server/db/schema';

export interface LiveBenchPlan {
	benchName: string;
	scenario: string;
	kind: RunKind;
	cell: string;
	thermometer: string;
	resistor: string;
	/** simulated seconds per real second */
	speed: number;
	readingIntervalS: number;
	transport: 'ws' | 'http';
}

// Speeds chosen so a newcomer sees a plateau form within a minute and end within a few.
export const LIVE_BENCHES: LiveBenchPlan[] = [
	{ benchName: 'Bench 2 · indium and tin', scenario: 'sn-freeze', kind: 'freeze', cell: 'KV-Sn-11', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', speed: 200, readingIntervalS: 5, transport: 'ws' },
	{ benchName: 'Bench 3 · zinc', scenario: 'zn-freeze-drift', kind: 'freeze', cell: 'KV-Zn-09', thermometer: 'KV-S-5182', resistor: 'KV-R25-01', speed: 200, readingIntervalS: 5, transport: 'http' },
	{ benchName: 'Bench 4 · aluminium and silver', scenario: 'al-freeze', kind: 'freeze', cell: 'KV-Al-02', thermometer: 'KV-S-5182', resistor: 'KV-R100-02', speed: 240, readingIntervalS: 5, transport: 'ws' },
	{ benchName: 'Bench 1 · water and gallium', scenario: 'tpw-triple-point', kind: 'triple-point', cell: 'KV-W-114', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', speed: 60, readingIntervalS: 5, transport: 'ws' }
];

async function idOf(db: DB, table: 'bench' | 'cell' | 'thermometer' | 'standard_resistor', column: 'name' | 'serial', value: string): Promise<number> {
	const row = await db.selectFrom(table).select('id').where(column, '=', value).executeTakeFirstOrThrow();
	return row.id;
}

/** Starts every live bench; returns a stop function. */
export async function startLiveBenches(db: DB, baseUrl: string, technician: SessionUser, supervisor: SessionUser, log: (m: string) => void): Promise<() => Promise<void>> {
	let stopping = false;
	const controllers = new Set<BenchController>();
	for (const [i, plan] of LIVE_BENCHES.entries()) {
		const benchId = await idOf(db, 'bench', 'name', plan.benchName);
		const { token } = await createBenchToken(db, supervisor, benchId, 'demo simulator');
		const cell = DEMO_CELLS.find((c) => c.serial === plan.cell)!;
		const ids = {
			cell: await idOf(db, 'cell', 'serial', plan.cell),
			thermometer: await idOf(db, 'thermometer', 'serial', plan.thermometer),
			resistor: await idOf(db, 'standard_resistor', 'serial', plan.resistor)
		};
		if (!DEMO_THERMOMETERS.some((t) => t.serial === plan.thermometer) || !DEMO_RESISTORS.some((r) => r.serial === plan.resistor)) throw new Error(`unknown demo equipment in ${plan.benchName}`);
		void (async () => {
			for (let round = 0; !stopping; round++) {
				const run = await createRun(db, technician, {
					bench_id: benchId,
					cell_id: ids.cell,
					thermometer_id: ids.thermometer,
					resistor_id: ids.resistor,
					fixed_point: cell.fixed_point,
					kind: plan.kind,
					operator_id: technician.id,
					sensor_depth_m: cell.immersion_depth_mm / 1000,
					gas_pressure_pa: 101_325,
					settings_json: JSON.stringify({ limits: { driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 5, silenceSeconds: 120 }, demo: { scenario: plan.scenario } }),
					notes: 'Demo: simulated bench'
				});
				await transitionRun(db, technician, run.id, 'start');
				log(`${plan.benchName}: run #${run.id} (${plan.scenario}) streaming over ${plan.transport}`);
				const bench = runBench({
					scenario: plan.scenario,
					overrides: { ...demoEquipmentOverrides(plan.thermometer, plan.resistor, plan.cell), readingIntervalS: plan.readingIntervalS, epochMs: Date.now() },
					seed: 100 * (i + 1) + round,
					target: plan.transport,
					url: baseUrl,
					token,
					runId: String(run.id),
					speed: plan.speed,
					log: (m) => log(`${plan.benchName}: ${m}`)
				});
				controllers.add(bench);
				try {
					await bench.done;
				} catch (e) {
					log(`${plan.benchName}: the simulated instrument stopped: ${(e as Error).message}`);
				}
				controllers.delete(bench);
				if (stopping) break;
				await transitionRun(db, technician, run.id, 'finish').catch(() => undefined);
				await new Promise((r) => setTimeout(r, 15_000));
			}
		})();
	}
	return async () => {
		stopping = true;
		await Promise.all([...controllers].map((c) => c.stop()));
	};
}
