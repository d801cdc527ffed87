import { describe, expect, it } from 'vitest';
import { appendNewer, raisedCurrentBands, slopeLine, spliceDetail, toPoints, type ChartReading } from './series';

const r = (timeMs: number, d: number | null, i = 1): ChartReading => ({ timeMs, deltaMilliKelvin: d, w: 1.6, t90Kelvin: 429.7, ratio: 1.64, currentMilliAmp: i });

describe('chart series helpers', () => {
	it('replaces the visible slice of the overview with finer readings, in time order', () => {
		const overview = [r(0, 0), r(10, 1), r(20, 2), r(30, 3)];
		const detail = [r(9, 9), r(12, 12), r(15, 15), r(25, 25)];
		expect(spliceDetail(overview, detail, 10, 20).map((p) => p.timeMs)).toEqual([0, 12, 15, 30]);
	});

	it('appends only readings newer than the newest held', () => {
		const held = [r(0, 0), r(10, 1)];
		expect(appendNewer(held, [r(10, 1), r(11, 2), r(11, 3), r(12, 4)])).toBe(2);
		expect(held.map((p) => p.timeMs)).toEqual([0, 10, 11, 12]);
	});

	it('leaves out readings the reduction could not make', () => {
		expect(toPoints([r(0, 1), r(1, null)], 'delta')).toEqual([{ x: 0, y: 1 }]);
	});

	it('finds stretches at a raised current against the lowest current', () => {
		const rs = [r(0, 0, 1), r(1, 0, 1.414), r(2, 0, 1.414), r(3, 0, 1), r(4, 0, 1.414)];
		expect(raisedCurrentBands(rs)).toEqual([
			{ fromMs: 1, toMs: 3, currentMilliAmp: 1.414 },
			{ fromMs: 4, toMs: 4, currentMilliAmp: 1.414 }
		]);
	});

	it('draws the slope line back from the newest value', () => {
		const [a, b] = slopeLine(0, 3_600_000, 1, 2);
		expect(a).toEqual({ x: 0, y: -1 });
		expect(b).toEqual({ x: 3_600_000, y: 1 });
	});
});
