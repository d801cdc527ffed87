import { describe, expect, it } from 'vitest';
import { reduceReading, rTpwNearestInTime } from '$lib/metrology';
import { loadReductionContext, reduceForLive } from './reduce';
import { ingestTestDb } from './test-db';

const reading = (ratio: number, timeMs = Date.now()) => ({ seq: 1, timeMs, ratio, currentMilliAmp: 1, channel: 1 });

describe('reduceForLive', () => {
	it('gives exactly what the metrology core’s reduceReading gives, with the run’s cached context', async () => {
		const { sqlite, runId } = await ingestTestDb();
		const ctx = loadReductionContext(sqlite, runId)!;
		expect(ctx.basis).toBe('calibrated');
		for (const ratio of [1.1426, 1.14265, 1.1427]) {
			const r = reading(ratio);
			const live = reduceForLive(ctx, r, false);
			const core = reduceReading({ ratio, resistor: ctx.resistor, resistorTemperatureCelsius: ctx.resistorTemperatureCelsius, rTpwOhm: rTpwNearestInTime(ctx.rTpwHistory, r.timeMs), subrange: ctx.subrange!, coefficients: ctx.coefficients!, point: 'Ga', corrections: ctx.corrections });
			expect(live.resistanceOhm).toBe(core.resistanceOhm);
			expect(live.t90Kelvin).toBe(core.t90Kelvin);
			expect(live.deltaMilliKelvin).toBeCloseTo(core.deltaMilliKelvin, 9);
		}
	});

	it('takes the R_TPW nearest in time (the cached span agrees with rTpwNearestInTime)', async () => {
		const { sqlite, runId } = await ingestTestDb();
		sqlite.prepare('insert into thermometer_rtpw (thermometer_id, measured_at, r_tpw_ohm, created_at) values (1, 1000, 25.5, 0), (1, 2000, 25.6, 0), (1, 2001, 25.7, 0)').run();
		const ctx = loadReductionContext(sqlite, runId)!;
		for (const t of [0, 1499, 1500, 1501, 2000, 2001, 5000, Date.now(), 1600, 1400]) {
			const live = reduceForLive(ctx, reading(1.1, t), false);
			expect(live.w! * rTpwNearestInTime(ctx.rTpwHistory, t)).toBeCloseTo(live.resistanceOhm!, 12);
		}
	});

	it('reduces with ΔW = 0 and says "uncalibrated" when the thermometer has no calibration', async () => {
		const { sqlite, runId } = await ingestTestDb({ calibrated: false });
		const ctx = loadReductionContext(sqlite, runId)!;
		expect(ctx.basis).toBe('uncalibrated');
		const live = reduceForLive(ctx, reading(1.14265), false);
		expect(live.t90Kelvin).toBeGreaterThan(302);
		expect(live.t90Kelvin).toBeLessThan(304);
	});

	it('leaves the derived values null (never throws) when no reduction is possible', async () => {
		const { sqlite, runId } = await ingestTestDb({ calibrated: false });
		sqlite.exec('delete from thermometer_rtpw');
		const ctx = loadReductionContext(sqlite, runId)!;
		expect(ctx.basis).toBe('unavailable');
		expect(reduceForLive(ctx, reading(1.14), true)).toMatchObject({ t90Kelvin: null, resistanceOhm: null, timeBackwards: true });
		const calibrated = loadReductionContext((await ingestTestDb()).sqlite, runId)!;
		const bad = reduceForLive(calibrated, reading(1e6), false);
		expect(bad.t90Kelvin).toBeNull();
		expect(bad.problem).toMatch(/./);
	});
});
