// What the bench tiles need at page load; live figures then come over the overview stream.
import type { DB } from '../db';
import type SQLite from 'better-sqlite3';
import { listBenches } from '../repositories/equipment';
import type { BenchSummary } from '$lib/live/protocol';
import { recentTrace } from './curve';

export interface TileRun {
	id: number;
	fixedPoint: string;
	kind: string;
	cellSerial: string;
	thermometerSerial: string;
	startedAt: number | null;
	silenceSeconds: number;
	readingCount: number;
	lastReadingAt: number | null;
	/** ΔT from the expected value (mK) over the last two hours, min/max decimated */
	trace: { t: number; v: number }[];
}

export interface TileBench {
	id: number;
	name: string;
	heatSource: string;
	heatSourceKind: string;
	location: string;
	bridgeChannel: number;
	run: TileRun | null;
}

export const DEFAULT_SILENCE_S = 120;

export async function benchTiles(db: DB, sqlite: SQLite.Database): Promise<TileBench[]> {
	const benches = await listBenches(db);
	const runs = await db
		.selectFrom('run')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.select(['run.id', 'run.bench_id', 'run.fixed_point', 'run.kind', 'run.started_at', 'run.settings_json', 'run.reading_count', 'run.last_reading_at', 'cell.serial as cell_serial', 'thermometer.serial as thermometer_serial'])
		.where('run.state', '=', 'recording')
		.execute();
	const byBench = new Map(runs.map((r) => [r.bench_id, r]));
	return benches.map((b) => {
		const r = byBench.get(b.id);
		let silence = DEFAULT_SILENCE_S;
		try {
			const s = JSON.parse(r?.settings_json || '{}') as { limits?: { silenceSeconds?: number } };
			if (typeof s.limits?.silenceSeconds === 'number' && s.limits.silenceSeconds > 0) silence = s.limits.silenceSeconds;
		} catch {
			/* default */
		}
		return {
			id: b.id,
			name: b.name,
			heatSource: b.heat_source,
			heatSourceKind: b.heat_source_kind,
			location: b.location,
			bridgeChannel: b.bridge_channel,
			run: r
				? {
						id: r.id,
						fixedPoint: r.fixed_point,
						kind: r.kind,
						cellSerial: r.cell_serial,
						thermometerSerial: r.thermometer_serial,
						startedAt: r.started_at,
						silenceSeconds: silence,
						readingCount: r.reading_count,
						lastReadingAt: r.last_reading_at,
						trace: recentTrace(sqlite, r.id)
					}
				: null
		};
	});
}

export type { BenchSummary };
