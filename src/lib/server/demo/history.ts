// Past realizations for the demo laboratory, produced by the bench simulator with the demo
// equipment's own R_TPW, deviation coefficients and standard resistors, so that reducing the stored
// readings gives values near the assigned ones, as a good laboratory's would.
import { simulate, type GroundTruth, type ScenarioOverrides, type SimReading } from '../../../../bench-simulator/src/index';
import { fixedPoint, referenceRatioDerivative, type FixedPointId, type SubrangeId } from '../../metrology/index';
import type { DB } from '../db';
import type { RunKind } from '../db/schema';
import { DEMO_CELLS, DEMO_RESISTORS, DEMO_THERMOMETERS } from './scenario';
import type { SeedResult } from './seed';

const DAY_MS = 86_400_000;

interface PastRun {
	scenario: string;
	cell: string;
	thermometer: string;
	resistor: string;
	bench: number;
	daysAgo: number;
	operator: string;
	impurityMolFraction?: number;
	signed: boolean;
	/** an immersion test on the plateau: the sensor raised step by step, then back to the bottom */
	immersion?: ImmersionTest;
}

interface ImmersionTest {
	/** hours after the plateau start of the first step (at full depth) */
	startHours: number;
	stepMinutes: number;
	/** sensor depths below the free surface, mm, in order */
	depthsMm: number[];
}

// prettier-ignore
export const PAST_RUNS: PastRun[] = [
	{ scenario: 'sn-freeze', cell: 'KV-Sn-11', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 1, daysAgo: 700, operator: 'tomas.varga@kestrelvale.example', signed: true },
	{ scenario: 'sn-freeze', cell: 'KV-Sn-11', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 1, daysAgo: 380, operator: 'mei.lindqvist@kestrelvale.example', signed: true },
	{ scenario: 'sn-freeze', cell: 'KV-Sn-11', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 1, daysAgo: 40, operator: 'tomas.varga@kestrelvale.example', signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 60, operator: 'mei.lindqvist@kestrelvale.example', impurityMolFraction: 6e-7, signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-09', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 55, operator: 'mei.lindqvist@kestrelvale.example', signed: true },
	{ scenario: 'in-freeze', cell: 'KV-In-03', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 1, daysAgo: 30, operator: 'tomas.varga@kestrelvale.example', signed: false },
	{ scenario: 'ga-melt', cell: 'KV-Ga-07', thermometer: 'KV-S-5182', resistor: 'KV-R25-01', bench: 0, daysAgo: 20, operator: 'tomas.varga@kestrelvale.example', signed: false },
	{ scenario: 'al-freeze', cell: 'KV-Al-02', thermometer: 'KV-S-5182', resistor: 'KV-R100-02', bench: 3, daysAgo: 12, operator: 'mei.lindqvist@kestrelvale.example', signed: false },
	// More zinc history on KV-Zn-05 for its control chart (one from a poorer fill), and an immersion test.
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 610, operator: 'tomas.varga@kestrelvale.example', signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 470, operator: 'mei.lindqvist@kestrelvale.example', impurityMolFraction: 2.5e-6, signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 330, operator: 'tomas.varga@kestrelvale.example', signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 190, operator: 'mei.lindqvist@kestrelvale.example', signed: true },
	{ scenario: 'zn-freeze', cell: 'KV-Zn-05', thermometer: 'KV-S-4471', resistor: 'KV-R25-01', bench: 2, daysAgo: 90, operator: 'tomas.varga@kestrelvale.example', signed: false, immersion: { startHours: 1.5, stepMinutes: 40, depthsMm: [180, 170, 160, 150, 140, 130, 180] } }
];

/**
 * The simulator keeps the sensor at one depth; an immersion test is laid over its readings afterwards:
 * from each step on, the sensor reads dT/dl × (depth − full depth) (ITS-90 Table 2) plus a small stem
 * conduction loss that grows as the sensor nears the surface (invented, of a plausible size).
 */
function applyImmersion(readings: SimReading[], truth: GroundTruth, test: ImmersionTest, rTpwOhm: number, resistorOhm: number, fullDepthMetre: number): { timeMs: number; depthMetre: number }[] {
	if (truth.plateauStartMs === null) return [];
	const fp = fixedPoint(truth.point);
	const ohmPerKelvinOverRs = (rTpwOhm * referenceRatioDerivative(fp.t90)) / resistorOhm;
	const steps = test.depthsMm.map((mm, i) => ({ timeMs: Math.round(truth.plateauStartMs! + test.startHours * 3_600_000 + i * test.stepMinutes * 60_000), depthMetre: mm / 1000 }));
	const endMs = steps.at(-1)!.timeMs + test.stepMinutes * 60_000;
	for (const r of readings) {
		if (r.timeMs < steps[0].timeMs || r.timeMs >= endMs) continue;
		const step = steps.filter((s) => s.timeMs <= r.timeMs).at(-1)!;
		const dK = fp.dTdl * (step.depthMetre - fullDepthMetre) - 0.3e-3 * Math.exp(-(step.depthMetre - 0.1) / 0.012);
		r.ratio = Number((r.ratio + dK * ohmPerKelvinOverRs).toPrecision(9));
	}
	return steps;
}

/** Simulator overrides that make a simulated bench use one of the demo laboratory's SPRTs, resistors and cells. */
export function demoEquipmentOverrides(thermometerSerial: string, resistorSerial: string, cellSerial: string): ScenarioOverrides {
	const t = DEMO_THERMOMETERS.find((x) => x.serial === thermometerSerial);
	const r = DEMO_RESISTORS.find((x) => x.serial === resistorSerial);
	const c = DEMO_CELLS.find((x) => x.serial === cellSerial);
	if (!t || !r || !c) throw new Error(`unknown demo equipment ${thermometerSerial} / ${resistorSerial} / ${cellSerial}`);
	return {
		thermometer: { serial: t.serial, rTpwOhm: t.r_tpw_ohm, subrange: t.subrange as SubrangeId, coefficients: t.coefficients },
		resistor: { calibratedOhm: r.calibrated_ohm, referenceTemperatureCelsius: r.reference_temperature_c, alphaPerKelvin: r.alpha_per_k, betaPerKelvin2: r.beta_per_k2 },
		resistorBathCelsius: r.bath_temperature_c,
		depthMetre: c.immersion_depth_mm / 1000,
		pressurePa: 101_325
	};
}

/** Inserts the finished past runs with all their raw readings and events. */
export async function seedPastRuns(db: DB, seed: SeedResult, nowMs: number, readingIntervalS = 10): Promise<number[]> {
	const ids: number[] = [];
	const supervisor = Object.entries(seed.userIds).find(([email]) => email.startsWith('ruth.'))?.[1] ?? null;
	for (const [i, past] of PAST_RUNS.entries()) {
		const epochMs = nowMs - past.daysAgo * DAY_MS;
		const overrides: ScenarioOverrides = { ...demoEquipmentOverrides(past.thermometer, past.resistor, past.cell), epochMs, readingIntervalS };
		if (past.impurityMolFraction !== undefined) overrides.impurityMolFraction = past.impurityMolFraction;
		const sim = simulate(past.scenario, overrides, 1000 + i);
		const cell = DEMO_CELLS.find((c) => c.serial === past.cell)!;
		const steps = past.immersion ? applyImmersion(sim.readings, sim.truth, past.immersion, overrides.thermometer!.rTpwOhm!, overrides.resistor!.calibratedOhm!, cell.immersion_depth_mm / 1000) : [];
		const first = sim.readings[0]?.timeMs ?? epochMs;
		const last = sim.readings.at(-1)?.timeMs ?? epochMs;
		const operatorId = seed.userIds[past.operator] ?? null;
		const run = await db
			.insertInto('run')
			.values({
				bench_id: seed.benchIds[past.bench],
				cell_id: seed.cellIds[past.cell],
				thermometer_id: seed.thermometerIds[past.thermometer],
				resistor_id: seed.resistorIds[past.resistor],
				fixed_point: cell.fixed_point as FixedPointId,
				kind: sim.truth.kind as RunKind,
				state: 'finished',
				// Signed off only after its events are in: a signed run refuses new events.
				review_state: 'unreviewed',
				operator_id: operatorId,
				created_by: operatorId,
				created_at: first - 30 * 60_000,
				started_at: first,
				ended_at: last,
				sensor_depth_m: cell.immersion_depth_mm / 1000,
				gas_pressure_pa: 101_325,
				settings_json: JSON.stringify({ readingIntervalS, scenario: past.scenario, demo: true }),
				signed_by: null,
				signed_at: null,
				reading_count: sim.readings.length,
				highest_seq: sim.readings.at(-1)?.seq ?? -1,
				last_reading_at: last
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		for (let k = 0; k < sim.readings.length; k += 500) {
			await db
				.insertInto('reading')
				.values(sim.readings.slice(k, k + 500).map((r) => ({ run_id: run.id, seq: r.seq, time_ms: r.timeMs, ratio: r.ratio, current_ma: r.currentMilliAmp, channel: r.channel })))
				.execute();
		}
		if (sim.events.length) {
			await db
				.insertInto('run_event')
				.values(sim.events.map((e) => ({ run_id: run.id, time_ms: e.timeMs, kind: e.kind, note: e.note ?? '', created_by: operatorId, created_at: e.timeMs })))
				.execute();
		}
		if (steps.length) {
			await db
				.insertInto('run_event')
				.values(steps.map((st) => ({ run_id: run.id, time_ms: st.timeMs, kind: 'immersion-step', note: `Immersion test: sensor at ${(st.depthMetre * 1000).toFixed(0)} mm below the surface`, depth_m: st.depthMetre, created_by: operatorId, created_at: st.timeMs })))
				.execute();
		}
		if (past.signed) {
			await db.updateTable('run').set({ review_state: 'signed', signed_by: supervisor, signed_at: last + DAY_MS }).where('id', '=', run.id).execute();
		}
		ids.push(run.id);
	}
	return ids;
}
