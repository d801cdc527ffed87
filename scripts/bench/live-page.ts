// The run page with long runs, in Chromium (Playwright): time from navigation to the chart's first draw
// (a sampled look) and to full detail (min/max over every reading), and to the finer detail after a
// zoom, for runs of 10^3, 10^5 and 10^6 readings written straight into a test database. Baseline: the
// first draw of the 10^3-reading run, measured in the same run. Goal: under 1.5 s for 10^6.
import { chromium, type Page } from '@playwright/test';
import { performance } from 'node:perf_hooks';
import { seededDatabase, startTestServer } from '../../tests/support/server';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { insertLongRun } from './long-run';
import { openSqlite } from '../../src/lib/server/db/index';
import { storedRunAnalysis } from '../../src/lib/server/analysis/run-analysis';

const SIZES = [1_000, 100_000, 1_000_000];

function line(name: string, value: number, unit: string, baseline: number | null, note = ''): string {
	const v = value >= 100 ? value.toFixed(0) : value.toFixed(1);
	return `${name}: ${v} ${unit}${baseline ? ` (${(value / baseline).toFixed(2)} x baseline)` : ''}${note ? ` ${note}` : ''}`;
}

async function openRun(page: Page, runId: number): Promise<{ firstMs: number; fullMs: number; points: number; detail: string }> {
	await page.goto(`/runs/${runId}`, { waitUntil: 'commit' });
	const chart = page.getByTestId('run-chart');
	await chart.and(page.locator('[data-full-detail-ms]')).waitFor({ timeout: 60_000 });
	const [first, full, points, detail] = await Promise.all(['data-first-draw-ms', 'data-full-detail-ms', 'data-points', 'data-detail'].map((a) => chart.getAttribute(a)));
	return { firstMs: Number(first), fullMs: Number(full), points: Number(points), detail: detail ?? '' };
}

async function zoomRefine(page: Page): Promise<number> {
	const canvas = page.getByTestId('run-chart-canvas');
	await canvas.hover();
	const before = performance.now();
	await page.mouse.wheel(0, -600);
	await page.locator('[data-refined-ms]').waitFor({ timeout: 30_000 });
	return performance.now() - before;
}

export async function runLivePageBench(): Promise<string[]> {
	const lines: string[] = [];
	const { dbPath } = await seededDatabase();
	const runs: Record<number, number> = {};
	for (const n of SIZES) {
		const t = performance.now();
		runs[n] = insertLongRun(dbPath, { readings: n });
		lines.push(line(`insert ${n.toExponential(0)} readings (10^4-row transactions)`, performance.now() - t, 'ms', null));
	}
	// The final analysis is computed once per run and cached (run.analysis_json); done here, timed, so the
	// page figures measure the chart and not that one-off computation.
	const sqlite = openSqlite(dbPath);
	for (const n of SIZES) {
		const t = performance.now();
		storedRunAnalysis(sqlite, runs[n]);
		lines.push(line(`final analysis of ${n.toExponential(0)} readings (once, then cached)`, performance.now() - t, 'ms', null));
	}
	sqlite.close();
	const server = await startTestServer({ dbPath });
	const browser = await chromium.launch({
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync']
	});
	try {
		const context = await browser.newContext({ baseURL: server.baseUrl, viewport: { width: 1440, height: 900 } });
		const page = await context.newPage();
		const user = DEMO_USERS.find((u) => u.role === 'engineer')!;
		await page.goto('/sign-in');
		await page.getByLabel('E-mail').fill(user.email);
		await page.getByLabel('Password').fill(user.password);
		await page.getByRole('button', { name: 'Sign in' }).click();
		await page.waitForURL(/\/benches$/);
		// warm the page's scripts once, so the first figure is not the bundle's download
		await openRun(page, runs[SIZES[0]]);
		const base = await openRun(page, runs[SIZES[0]]);
		const baseline = Math.max(base.firstMs, 1);
		lines.push(line('run page 10^3 readings, first draw (baseline)', base.firstMs, 'ms', baseline, `[${base.detail}, ${base.points} points]`));
		for (const n of SIZES.slice(1)) {
			const label = `10^${Math.round(Math.log10(n))}`;
			const cold = await openRun(page, runs[n]);
			lines.push(line(`run page ${label} readings, first draw`, cold.firstMs, 'ms', baseline, `[sampled, ${n.toLocaleString('en')} readings]`));
			lines.push(line(`run page ${label} readings, full detail`, cold.fullMs, 'ms', baseline, `[${cold.detail}, ${cold.points} points]`));
			const refine = await zoomRefine(page);
			lines.push(line(`run page ${label} readings, zoom to finer detail`, refine, 'ms', baseline));
			const again = await openRun(page, runs[n]);
			lines.push(line(`run page ${label} readings, full detail (second visit)`, again.fullMs, 'ms', baseline));
		}
		// the endpoint alone, for the server's share
		const cookies = (await context.cookies()).map((c) => `${c.name}=${c.value}`).join('; ');
		for (const [q, name] of [
			['sampled=1&points=900', 'sampled'],
			['points=900', 'min/max']
		] as const) {
			const t = performance.now();
			const res = await fetch(`${server.baseUrl}/runs/${runs[1_000_000]}/curve?${q}`, { headers: { cookie: cookies } });
			await res.arrayBuffer();
			lines.push(line(`curve endpoint 10^6 readings, ${name}`, performance.now() - t, 'ms', baseline));
		}
		await context.close();
	} finally {
		await browser.close();
		await server.stop();
	}
	return lines;
}

// Run on its own: npx tsx scripts/bench/live-page.ts
if (import.meta.url === `file://${process.argv[1]}`) {
	for (const l of await runLivePageBench()) console.log(l);
}
