import { expect, test } from '@playwright/test';
import { readFileSync } from 'node:fs';
import { screenshot, signInAs } from './helpers';

test('a technician sets up a mercury run, is told what is wrong, sees the cautions, starts, marks an event and finishes', async ({ page }) => {
	await signInAs(page, 'technician');
	await page.goto('/runs');
	await page.getByTestId('new-run').click();
	const form = page.getByTestId('run-setup');

	// Submit with nothing chosen: each field says what is missing.
	await form.getByLabel('Immersion depth (mm)').fill('');
	await form.getByRole('button', { name: 'Set up the run' }).click();
	await expect(page.getByTestId('error-benchId')).toHaveText('Choose a bench.');
	await expect(page.getByTestId('error-cellId')).toHaveText('Choose a cell.');

	await form.getByLabel('Bench').selectOption({ label: 'Bench 5 · mercury and argon' });
	await form.getByLabel('Cell').selectOption({ label: 'KV-Hg-04 · Mercury triple point' });
	await expect(page.getByTestId('cautions')).toContainText('Mercury');
	await expect(page.getByTestId('cautions')).toContainText('quality system');
	await expect(form.getByLabel('Immersion depth (mm)')).toHaveValue('180');
	await form.getByLabel('Thermometer').selectOption({ label: 'KV-S-6020 (SPRT)' });
	await form.getByLabel('Standard resistor').selectOption({ label: 'KV-R25-01 (25 Ω)' });
	await form.getByLabel('Kind of realization').selectOption('triple-point');
	// A sensor deeper than the cell is refused with the reason.
	await form.getByLabel('Immersion depth (mm)').fill('900');
	await screenshot(page, 'run-setup-technician-light');
	await form.getByRole('button', { name: 'Set up the run' }).click();
	await expect(page.getByTestId('error-sensorDepthMm')).toContainText('cannot sit 900 mm deep');
	await form.getByLabel('Immersion depth (mm)').fill('175');
	await form.getByRole('button', { name: 'Set up the run' }).click();

	await expect(page).toHaveURL(/\/runs\/\d+$/);
	await expect(page.getByTestId('run-state')).toHaveText('Setting up');
	await expect(page.getByTestId('run-facts')).toContainText('175');
	await page.getByTestId('transition-start').click();
	await expect(page.getByTestId('run-state')).toHaveText('Recording');
	await page.getByTestId('event-buttons').getByRole('button', { name: 'Inner interface formed' }).click();
	await expect(page.getByTestId('events')).toContainText('Inner interface formed');
	await page.getByLabel('Note').fill('Mantle looks even all round');
	await page.getByRole('button', { name: 'Add' }).click();
	await expect(page.getByTestId('events')).toContainText('Mantle looks even all round');
	await page.getByTestId('transition-finish').click();
	await expect(page.getByTestId('run-state')).toHaveText('Finished');
	// A technician may not reopen a finished run (that is the supervisor's call).
	await expect(page.getByTestId('transition-reopen')).toHaveCount(0);
	await expect(page.getByTestId('run-history')).toContainText('setup → recording');
	await expect(page.getByTestId('run-history')).toContainText('recording → finished');
	await screenshot(page, 'run-detail-technician-light');
});

test('the runs table filters, sorts and pages on the server, and a run exports its readings as CSV', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/runs');
	const filters = page.getByTestId('run-filters');
	await filters.getByLabel('Fixed point').selectOption('Sn');
	await filters.getByRole('button', { name: 'Filter' }).click();
	await expect(page).toHaveURL(/point=Sn/);
	const rows = page.getByTestId('run-row');
	await expect(rows).toHaveCount(3);
	for (const text of await rows.allTextContents()) expect(text).toContain('Tin freezing point');

	await page.goto('/runs?sort=readings&dir=asc&size=5');
	const counts = (await page.getByTestId('run-row').locator('td:last-child').allTextContents()).map((t) => Number(t.replace(/,/g, '')));
	expect(counts).toEqual([...counts].sort((a, b) => a - b));
	await expect(page.getByTestId('next-page')).toBeVisible();
	await page.getByTestId('next-page').click();
	await expect(page).toHaveURL(/page=2/);

	await page.goto('/runs?point=Zn');
	await page.getByTestId('run-row').first().getByRole('link').click();
	const download = page.waitForEvent('download');
	await page.getByTestId('csv-export').click();
	const file = await (await download).path();
	const lines = readFileSync(file, 'utf8').trim().split('\n');
	expect(lines[1]).toBe('seq,time_utc,time_ms,bridge_ratio,current_mA,channel,resistance_ohm,W,T90_K,delta_from_assigned_mK,note');
	// Mid-plateau the zinc point reads within a few mK of 692.677 K (ITS-90 Table 1) after corrections.
	const mid = lines[Math.floor(lines.length / 2)].split(',');
	expect(Math.abs(Number(mid[8]) - 692.677)).toBeLessThan(0.005);
	expect(Math.abs(Number(mid[9]))).toBeLessThan(5);
});
