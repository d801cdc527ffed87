import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fitDeviation, ratioFromTemperature, temperatureFromRatio, type DeviationCoefficients } from '../../src/lib/metrology/index';
import { storedRunAnalysis } from '../../src/lib/server/analysis/run-analysis';
import { measuredPoint } from '../../src/lib/server/calibration/measured';
import { calibrationReport, previewCalibration, storeCalibration } from '../../src/lib/server/calibration/service';
import { loadReductionContext, reduceForLive } from '../../src/lib/server/ingest/reduce';
import { calibrationPdf } from '../../src/lib/server/report/calibration-pdf';
import { ROOT } from '../support/server';
import { calibrationLab, RESISTOR_OHM, type CalLab } from './calibration-fixture';

// NIST SP 250-81 worked example, sub-range TPW–Sn–Zn (figures via /work/shared/reference/its90-data.md):
// R_TPW = 25.319871 Ω, a = −1.2134e-4, b = −9.9190e-6; R = 47.922451 Ω ↔ 231.928 °C, R = 65.039218 Ω ↔ 419.527 °C.
const R_TPW = 25.319871;
const R_SN = 47.922451;
const R_ZN = 65.039218;
const A = -1.2134e-4;
const B = -9.919e-6;

let lab: CalLab;
let exact: CalLab;
let snRun: number;
let znRun: number;
let olderZnRun: number;

beforeAll(async () => {
	lab = await calibrationLab(R_TPW, 'NIST-EX-1');
	// The thermometer arrives with a current calibration that is plainly wrong: a calibration made from
	// its runs must not depend on it.
	await lab.db
		.insertInto('calibration')
		.values({ thermometer_id: lab.thermometerId, version: 1, subrange: 'TPW-Sn-Zn', coefficients_json: JSON.stringify({ a: 3.0e-4, b: 2.0e-5 }), r_tpw_ohm: R_TPW, status: 'current', created_at: Date.now() - 90 * 86_400_000 })
		.execute();
	olderZnRun = await lab.freezeRun('Zn', R_ZN + 0.0004, { startMs: Date.now() - 25 * 86_400_000 });
	snRun = await lab.freezeRun('Sn', R_SN, { startMs: Date.now() - 20 * 86_400_000 });
	znRun = await lab.freezeRun('Zn', R_ZN, { startMs: Date.now() - 18 * 86_400_000 });
	await lab.freezeRun('Sn', R_SN + 0.001, { startMs: Date.now() - 10 * 86_400_000, signed: false });
	// A second thermometer whose plateaux sit at the published coefficients' own W(T), unrounded.
	exact = await calibrationLab(R_TPW, 'NIST-EX-3');
	for (const [point, t] of [['Sn', 505.078], ['Zn', 692.677]] as const) await exact.freezeRun(point, ratioFromTemperature(t, 'TPW-Sn-Zn', { a: A, b: B }) * R_TPW);
}, 60_000);

afterAll(async () => {
	await lab?.close();
	await exact?.close();
});

describe('measured W at a point, from stored readings', () => {
	it('is R/R_TPW of the plateau (ratio × R_s / R_TPW), whatever the current calibration says', () => {
		const sn = measuredPoint(lab.sqlite, snRun);
		const zn = measuredPoint(lab.sqlite, znRun);
		if (!sn.ok || !zn.ok) throw new Error('no plateau');
		expect(Math.abs(sn.value.w - R_SN / R_TPW)).toBeLessThan(2e-9);
		expect(Math.abs(zn.value.w - R_ZN / R_TPW)).toBeLessThan(2e-9);
		expect(sn.value.rTpwOhm).toBe(R_TPW);
		expect(Math.abs(sn.value.resistanceOhm - R_SN)).toBeLessThan(5e-8);
		// the run page, reducing through the wrong calibration, reads the tin plateau far from 505.078 K …
		const viaOld = storedRunAnalysis(lab.sqlite, snRun)!;
		expect(Math.abs(viaOld.analysis!.result!.t90Kelvin - 505.078)).toBeGreaterThan(0.05);
		// … and still inverts back to the same W (the same readings, the same thermometer)
		expect(Math.abs(viaOld.wAtPoint! - sn.value.w)).toBeLessThan(1e-8);
	});

	it('does not need the old calibration to cover the point (a TPW–In calibration cannot reduce zinc)', async () => {
		const other = await calibrationLab(R_TPW, 'NIST-EX-2');
		try {
			const run = await other.freezeRun('Zn', R_ZN);
			await other.db.insertInto('calibration').values({ thermometer_id: other.thermometerId, version: 1, subrange: 'TPW-In', coefficients_json: JSON.stringify({ a: -1.2e-4 }), r_tpw_ohm: R_TPW, status: 'current', created_at: Date.now() }).execute();
			expect(storedRunAnalysis(other.sqlite, run)!.wAtPoint).toBeNull();
			const m = measuredPoint(other.sqlite, run);
			expect(m.ok && Math.abs(m.value.w - R_ZN / R_TPW)).toBeLessThan(2e-9);
		} finally {
			await other.close();
		}
	}, 60_000);
});

describe('calibration flow, TPW–Sn–Zn, end to end from stored runs', () => {
	it('from plateaux at W(T) of the published coefficients, gives back a and b to the digits the source gives', async () => {
		const p = (await previewCalibration(exact, exact.thermometerId, 'TPW-Sn-Zn', {}))!;
		expect(p.problems).toEqual([]);
		const k = p.result!.coefficients;
		expect(k.a.toPrecision(5)).toBe('-0.00012134');
		expect(k.b!.toPrecision(5)).toBe('-0.0000099190');
		expect(Math.abs(k.a - A)).toBeLessThanOrEqual(0.5e-8);
		expect(Math.abs(k.b! - B)).toBeLessThanOrEqual(0.5e-10);
	});

	it('proposes the newest signed-off run at each point; from the published R values it agrees with a and b within their rounding', async () => {
		const p = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn', {}))!;
		expect(p.problems).toEqual([]);
		expect(p.points.map((x) => [x.point, x.run?.runId])).toEqual([
			['Sn', snRun],
			['Zn', znRun]
		]);
		// The unsigned tin run is not offered; the older zinc run is, as the alternative.
		expect(p.points[0].options.map((o) => o.runId)).toEqual([snRun]);
		expect(p.points[1].options.map((o) => o.runId)).toEqual([znRun, olderZnRun]);
		const k = p.result!.coefficients;
		// The example prints R to 1 µΩ (≈ 0.01 mK), and a, b react strongly to W: the published a, b must lie
		// inside the spread that ±0.5 µΩ on R_TPW, R(Sn) and R(Zn) gives (corners of the rounding box).
		let spreadA = 0;
		let spreadB = 0;
		for (const dt of [-0.5e-6, 0.5e-6])
			for (const ds of [-0.5e-6, 0.5e-6])
				for (const dz of [-0.5e-6, 0.5e-6]) {
					const c = fitDeviation('TPW-Sn-Zn', [
						{ point: 'Sn', w: (R_SN + ds) / (R_TPW + dt) },
						{ point: 'Zn', w: (R_ZN + dz) / (R_TPW + dt) }
					]);
					spreadA = Math.max(spreadA, Math.abs(c.a - k.a));
					spreadB = Math.max(spreadB, Math.abs(c.b! - k.b!));
				}
		expect(Math.abs(k.a - A)).toBeLessThanOrEqual(spreadA);
		expect(Math.abs(k.b! - B)).toBeLessThanOrEqual(spreadB);
		// and the two functions agree within 0.02 mK at the points (what 1 µΩ is worth there)
		expect(Math.abs(temperatureFromRatio(R_SN / R_TPW, 'TPW-Sn-Zn', { a: A, b: B }) - temperatureFromRatio(R_SN / R_TPW, 'TPW-Sn-Zn', k))).toBeLessThan(2e-5);
		expect(Math.abs(temperatureFromRatio(R_ZN / R_TPW, 'TPW-Sn-Zn', { a: A, b: B }) - temperatureFromRatio(R_ZN / R_TPW, 'TPW-Sn-Zn', k))).toBeLessThan(2e-5);
		expect(p.rTpwOhm).toBe(R_TPW);
	});

	it('shows zero residuals at the calibration points and a table through 231.928 °C and 419.527 °C', async () => {
		const p = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn', {}, 10))!;
		const r = p.result!;
		expect(r.residuals.map((x) => x.point)).toEqual(['TPW', 'Sn', 'Zn']);
		for (const x of r.residuals) {
			expect(Math.abs(x.residualW)).toBeLessThan(1e-12);
			expect(Math.abs(x.residualMilliKelvin)).toBeLessThan(1e-6);
		}
		const sn = r.table.find((row) => row.point === 'Sn')!;
		const zn = r.table.find((row) => row.point === 'Zn')!;
		// The table's R at the tin and zinc points is the published R within the equivalent of 0.1 mK.
		expect(Math.abs(sn.resistanceOhm - R_SN) / sn.ohmPerKelvin).toBeLessThan(1e-4);
		expect(Math.abs(zn.resistanceOhm - R_ZN) / zn.ohmPerKelvin).toBeLessThan(1e-4);
		expect(Math.abs(sn.t90Celsius - 231.928)).toBeLessThan(1e-9);
		expect(Math.abs(zn.t90Celsius - 419.527)).toBeLessThan(1e-9);
		// and the published resistances read back through the fitted function within 0.1 mK
		expect(Math.abs(temperatureFromRatio(R_SN / R_TPW, 'TPW-Sn-Zn', r.coefficients) - 273.15 - 231.928)).toBeLessThan(1e-4);
		expect(Math.abs(temperatureFromRatio(R_ZN / R_TPW, 'TPW-Sn-Zn', r.coefficients) - 273.15 - 419.527)).toBeLessThan(1e-4);
		// steps of 10 °C from 0 °C to 410 °C plus TPW, Sn and Zn
		expect(r.table.filter((row) => row.point === null).map((row) => Math.round(row.t90Celsius))).toEqual(Array.from({ length: 42 }, (_, i) => i * 10));
		// dR/dT at the tin point: about R_TPW × dW/dT ≈ 0.0946 Ω/K for a 25.3 Ω SPRT
		expect(sn.ohmPerKelvin).toBeGreaterThan(0.09);
		expect(sn.ohmPerKelvin).toBeLessThan(0.1);
	});

	it('propagates each point: at a calibration point its own u comes back, and the TPW share vanishes at the TPW', async () => {
		const p = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn', {}))!;
		const r = p.result!;
		const snPoint = p.points[0].measured!;
		if (!snPoint.ok) throw new Error('no plateau');
		const atSn = r.atPoints[0];
		const snShare = atSn.components.find((c) => c.source === 'Sn')!.uMilliKelvin;
		expect(snShare / snPoint.value.uMilliKelvin).toBeCloseTo(1, 3);
		// zinc's value does not move the function at the tin point (the fit passes through tin)
		expect(atSn.components.find((c) => c.source === 'Zn')!.uMilliKelvin).toBeLessThan(1e-6);
		const tpwRow = r.table.find((row) => row.point === 'TPW')!;
		expect(tpwRow.uMilliKelvin!).toBeLessThan(1e-6);
		// between the points the uncertainty is bounded by the sum of the shares and is above zero
		const mid = r.table.find((row) => Math.round(row.t90Celsius) === 300)!;
		expect(mid.uMilliKelvin!).toBeGreaterThan(0);
	});

	it('lets the engineer swap a run, and refuses a run that is not a signed-off one of this thermometer', async () => {
		const swapped = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn', { Zn: olderZnRun }))!;
		expect(swapped.points[1].run!.runId).toBe(olderZnRun);
		expect(Math.abs(swapped.result!.coefficients.a - A)).toBeGreaterThan(1e-7);
		const bad = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn', { Sn: 99999 }))!;
		expect(bad.problems.join(' ')).toContain('#99999');
		expect(bad.result).toBeNull();
		const missing = (await previewCalibration(lab, lab.thermometerId, 'TPW-Sn-Zn-Al', {}))!;
		expect(missing.problems.join(' ')).toContain('aluminium');
	});

	it('stores a new current version, supersedes the old one, audits it, and reduction uses it from then on', async () => {
		const before = loadReductionContext(lab.sqlite, snRun)!;
		expect(before.coefficients).toEqual({ a: 3.0e-4, b: 2.0e-5 });
		const stored = await storeCalibration(lab, lab.engineer, lab.thermometerId, 'TPW-Sn-Zn', {}, 'NIST example');
		if (!stored.ok) throw new Error(stored.message);
		expect(stored.version).toBe(2);
		const rows = await lab.db.selectFrom('calibration').select(['version', 'status']).where('thermometer_id', '=', lab.thermometerId).orderBy('version').execute();
		expect(rows).toEqual([
			{ version: 1, status: 'superseded' },
			{ version: 2, status: 'current' }
		]);
		const audit = await lab.db.selectFrom('audit_log').selectAll().where('action', '=', 'calibration.create').execute();
		expect(audit).toHaveLength(1);
		expect(audit[0].actor_id).toBe(lab.engineer.id);
		expect(audit[0].summary).toContain('v2');
		expect(audit[0].summary).toContain('v1 superseded');

		// The reduction context now carries the new coefficients …
		const after = loadReductionContext(lab.sqlite, snRun)!;
		const k = after.coefficients as DeviationCoefficients;
		expect(after.basis).toBe('calibrated');
		expect(k).not.toEqual({ a: 3.0e-4, b: 2.0e-5 });
		expect(Math.abs(k.a - A)).toBeLessThan(1e-7);
		// … so the stored runs, analysed again, sit on the assigned values within 0.1 mK …
		const sn = storedRunAnalysis(lab.sqlite, snRun)!;
		const zn = storedRunAnalysis(lab.sqlite, znRun)!;
		expect(Math.abs(sn.analysis!.result!.t90Kelvin - 505.078)).toBeLessThan(1e-4);
		expect(Math.abs(zn.analysis!.result!.t90Kelvin - 692.677)).toBeLessThan(1e-4);
		// … and a run recorded after the calibration reduces each reading through it.
		const later = await lab.freezeRun('Sn', R_SN, { startMs: Date.now() - 86_400_000, signed: false });
		const ctx = loadReductionContext(lab.sqlite, later)!;
		const live = reduceForLive(ctx, { seq: 1, timeMs: Date.now(), ratio: R_ZN / RESISTOR_OHM, currentMilliAmp: 1, channel: 1 }, false);
		expect(Math.abs(live.t90Kelvin! - 692.677)).toBeLessThan(1e-4);
		expect(Math.abs(temperatureFromRatio(R_SN / R_TPW, 'TPW-Sn-Zn', k) - 505.078)).toBeLessThan(1e-4);

		const report = (await calibrationReport(lab.db, stored.id))!;
		expect(report.fromRuns).toBe(true);
		expect(report.runs.map((r) => r.runId)).toEqual([snRun, znRun]);
		expect(report.residuals.every((r) => Math.abs(r.residualMilliKelvin) < 1e-6)).toBe(true);
		expect(report.table.find((r) => r.point === 'Zn')!.expandedMilliKelvin!).toBeGreaterThan(0);
	}, 60_000);

	it('keeps only one current version per thermometer, in the database itself', async () => {
		await expect(
			lab.db.insertInto('calibration').values({ thermometer_id: lab.thermometerId, version: 9, subrange: 'TPW-Sn-Zn', coefficients_json: '{"a":0}', r_tpw_ohm: R_TPW, status: 'current', created_at: Date.now() }).execute()
		).rejects.toThrow(/UNIQUE/);
	});
});

describe('calibration report PDF', () => {
	it('embeds its fonts and carries the serial, the coefficients, the table and the review statement', async () => {
		const id = (await lab.db.selectFrom('calibration').select('id').where('thermometer_id', '=', lab.thermometerId).where('status', '=', 'current').executeTakeFirstOrThrow()).id;
		const report = (await calibrationReport(lab.db, id, 25))!;
		const pdf = await calibrationPdf(report);
		expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
		mkdirSync(join(ROOT, 'test-artifacts'), { recursive: true });
		const file = join(ROOT, 'test-artifacts', 'calibration-report-test.pdf');
		writeFileSync(file, pdf);
		// embedded TrueType subsets (FontFile2), none of the 14 standard fonts referenced by name alone
		const raw = pdf.toString('latin1');
		expect(raw.match(/\/FontFile2/g)?.length ?? 0).toBeGreaterThanOrEqual(3);
		expect(raw).not.toMatch(/\/BaseFont \/Helvetica/);
		const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
		expect(text).toContain('NIST-EX-1');
		const a = report.coefficients.a;
		// the coefficients as printed: mantissa to 5 significant figures
		expect(text).toContain(`${(a / 1e-4).toFixed(4).replace('-', '−')} × 10^−4`);
		expect(text).toContain(`${(report.coefficients.b! / 1e-6).toFixed(4).replace('-', '−')} × 10^−6`);
		expect(text).toContain('231.928');
		expect(text).toContain('419.527');
		expect(text).toContain('quality system');
		expect(text).toMatch(/page 1 of \d/);
	});
});
