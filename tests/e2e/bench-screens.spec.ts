import { expect, test, type Page } from '@playwright/test';
import { join } from 'node:path';
import { runBench, type BenchController } from '../../bench-simulator/src/index';
import { createKysely, openSqlite } from '../../src/lib/server/db/index';
import { createBenchToken } from '../../src/lib/server/tokens/index';
import { demoEquipmentOverrides } from '../../src/lib/server/demo/history';
import type { SessionUser } from '../../src/lib/server/auth/types';
import { ROOT } from '../support/server';
import { demoUser, screenshot, setTheme, signInAs } from './helpers';

// The e2e server's database (tests/support/e2e-server.ts): the test makes a bench token in it, as a
// supervisor would on the instruments page, and streams a simulated freeze in with it.
async function benchToken(benchName: string): Promise<string> {
	const db = createKysely(openSqlite(join(ROOT, 'test-artifacts/e2e.db')));
	try {
		const sup = demoUser('supervisor');
		const u = await db.selectFrom('user').select(['id', 'name', 'email', 'role']).where('email', '=', sup.email).executeTakeFirstOrThrow();
		const bench = await db.selectFrom('bench').select('id').where('name', '=', benchName).executeTakeFirstOrThrow();
		const actor: SessionUser = { id: String(u.id), name: String(u.name), email: String(u.email), role: 'supervisor' };
		return (await createBenchToken(db, actor, bench.id, 'e2e bench screens')).token;
	} finally {
		await db.destroy();
	}
}

async function bothThemes(page: Page, name: string) {
	await setTheme(page, 'light');
	await page.waitForTimeout(150);
	await screenshot(page, `${name}-light`);
	await setTheme(page, 'dark');
	await page.waitForTimeout(150);
	await screenshot(page, `${name}-dark`);
	await setTheme(page, 'light');
}

const BENCH = 'Bench 2 · indium and tin';

test('a technician starts an indium freeze, watches it live on the tile and the run page, marks an event, finishes and reads the analysis', async ({ page, context, baseURL }) => {
	test.setTimeout(240_000);
	await signInAs(page, 'technician');
	await page.goto('/runs/new');
	const form = page.getByTestId('run-setup');
	await form.getByLabel('Bench').selectOption({ label: BENCH });
	await form.getByLabel('Cell').selectOption({ label: 'KV-In-03 · Indium freezing point' });
	await form.getByLabel('Thermometer').selectOption({ label: 'KV-S-4471 (SPRT)' });
	await form.getByLabel('Standard resistor').selectOption({ label: 'KV-R25-01 (25 Ω)' });
	await form.getByLabel('Kind of realization').selectOption('freeze');
	await form.getByRole('button', { name: 'Set up the run' }).click();
	await expect(page).toHaveURL(/\/runs\/\d+$/);
	const runId = page.url().split('/').at(-1)!;
	await page.getByTestId('transition-start').click();
	await expect(page.getByTestId('run-state')).toHaveText('Recording');
	await expect(page.getByTestId('run-chart')).toBeVisible();

	// The overview in a second tab, open before any reading arrives: it must update without a reload.
	const tiles = await context.newPage();
	await tiles.goto('/benches');
	const tile = tiles.getByTestId('bench-tile').filter({ hasText: BENCH });
	await expect(tile.getByTestId('tile-run-link')).toHaveAttribute('href', `/runs/${runId}`);
	await expect(tile.getByTestId('tile-value')).toHaveText('— mK');
	await expect(tiles.getByTestId('live-connection')).toHaveAttribute('data-state', 'open');
	await expect(tiles.getByTestId('tile-idle')).toHaveCount(4);

	const token = await benchToken(BENCH);
	let bench: BenchController | null = runBench({
		scenario: 'quick-in-freeze',
		overrides: { ...demoEquipmentOverrides('KV-S-4471', 'KV-R25-01', 'KV-In-03'), epochMs: Date.now() },
		seed: 7,
		target: 'http',
		url: baseURL!,
		token,
		runId,
		speed: 110
	});
	try {
		// The tile: a value with its unit, a trace, the instrument talking.
		await expect(tile.getByTestId('tile-value')).toHaveText(/^[+-]?\d+\.\d{3} mK$/, { timeout: 20_000 });
		await expect(tile.getByTestId('tile-age')).toHaveAttribute('data-tone', 'steady');
		await expect.poll(async () => Number(await tile.getByTestId('tile-trace').getAttribute('data-points')), { timeout: 20_000 }).toBeGreaterThan(5);

		// The run page: the chart grows live, the numbers panel counts readings per minute.
		const chart = page.getByTestId('run-chart');
		await expect.poll(async () => Number(await chart.getAttribute('data-points')), { timeout: 20_000 }).toBeGreaterThan(50);
		await expect(page.getByTestId('figure-rate')).toContainText(/\d+ readings\/min/);
		await expect(page.getByTestId('reduction-basis')).toContainText('current calibration');

		// The plateau is shaded once the tracker finds it, and the tile says so too.
		await expect(chart).toHaveAttribute('data-plateau', 'shaded', { timeout: 90_000 });
		await expect(tile.getByTestId('tile-state')).toHaveText(/On the plateau|Plateau giving way|Plateau over/, { timeout: 20_000 });
		await expect(page.getByTestId('figure-slope')).toContainText(/± \d+\.\d{3} mK\/h/);
		await expect(page.getByTestId('figure-plateau-time')).toContainText(/\d+ (s|min)/);

		// One click: the event is listed and on the chart at once.
		const marks = Number(await chart.getAttribute('data-events'));
		await page.getByTestId('event-buttons').getByRole('button', { name: 'Thermometer moved' }).click();
		await expect(page.getByTestId('events')).toContainText('Thermometer moved');
		await expect(chart).toHaveAttribute('data-events', String(marks + 1));

		await bothThemes(tiles, 'bench-screens-benches');
		await bothThemes(page, 'bench-screens-live-run');

		// Follow live turns off on zoom, and back on.
		await page.getByTestId('run-chart-canvas').hover();
		await page.mouse.wheel(0, -400);
		await expect(chart).toHaveAttribute('data-follow', 'off');
		await page.getByTestId('follow-live').click();
		await expect(chart).toHaveAttribute('data-follow', 'on');

		await bench.done;
		bench = null;
		// A page opened after the last reading shows the newest reading at once (from the server), not a dash.
		const fresh = await context.newPage();
		await fresh.goto(`/runs/${runId}`);
		await expect(fresh.getByTestId('figure-latest')).toContainText(/[+-]?\d+\.\d{3} mK/);
		await fresh.close();
	} finally {
		await bench?.stop();
	}

	await page.getByTestId('transition-finish').click();
	await expect(page.getByTestId('run-state')).toHaveText('Finished');
	const analysis = page.getByTestId('run-analysis');
	await expect(analysis).toBeVisible({ timeout: 30_000 });
	await expect(page.getByTestId('run-live')).toHaveAttribute('data-live', 'off');
	await expect(page.getByTestId('run-chart')).toHaveAttribute('data-plateau', 'shaded');
	await expect(page.getByTestId('analysis-result')).toContainText(/[+-]?\d+\.\d{3} mK/);
	await expect(page.getByTestId('analysis-budget')).toContainText('Expanded uncertainty U (k = 2)');
	await expect(page.getByTestId('budget-expanded')).toHaveText(/^\d+\.\d{4} mK$/);
	await expect(page.getByTestId('analysis-fraction-slopes')).toContainText('mK/h');
	await expect(page.getByTestId('analysis-liquidus')).toContainText(' K');
	await expect(page.getByTestId('review-note')).toContainText('quality system and local regulations');
	await expect(page.getByTestId('run-history')).toContainText('recording → finished');
	await page.getByTestId('second-panel-switch').getByRole('radio', { name: 'T90 (K)' }).click();
	await bothThemes(page, 'bench-screens-run-detail');

	// The bench is idle again on the overview, without a reload.
	await expect(tile.getByTestId('tile-idle')).toBeVisible({ timeout: 15_000 });
	await bothThemes(tiles, 'bench-screens-benches-after');
});
