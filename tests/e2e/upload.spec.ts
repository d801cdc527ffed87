import { expect, test } from '@playwright/test';
import { screenshot, setTheme, signInAs } from './helpers';

test('an engineer uploads a CSV with bad rows, skips them, confirms and finds the run in /runs', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/runs/upload');
	await expect(page.getByTestId('upload-limits')).toContainText('200 MiB');

	// 20 data rows, one a second; lines 5, 9 and 14 are bad (ratio text, empty current, bad time).
	const lines = ['time,ratio,current_mA,channel'];
	for (let i = 0; i < 20; i++) {
		const line = i + 2;
		const time = line === 14 ? '2026-02-30 10:00:13' : `2026-03-04 10:00:${String(i).padStart(2, '0')}`;
		const ratio = line === 5 ? 'overload' : (1.1181312 + i * 1e-7).toFixed(9);
		const current = line === 9 ? '' : '1.000';
		lines.push(`${time},${ratio},${current},1`);
	}
	await page.getByTestId('upload-file').setInputFiles({ name: 'ga-melt-2026-03-04.csv', mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n') + '\n') });

	const mapping = page.getByTestId('mapping');
	await expect(mapping).toBeVisible();
	await expect(mapping.getByLabel('Time column')).toHaveValue('0');
	await expect(mapping.getByLabel('Current column')).toHaveValue('2');
	// The preview already shows line 5's problem.
	await expect(page.getByTestId('preview')).toContainText('Bridge ratio: not a number');

	const details = page.getByTestId('run-details');
	await details.getByLabel('Bench').selectOption({ label: 'Bench 1 · water and gallium' });
	await details.getByLabel('Cell', { exact: true }).selectOption({ label: 'KV-Ga-07 · Gallium melting point' });
	await details.getByLabel('Thermometer').selectOption({ label: 'KV-S-4471 · SPRT' });
	await details.getByLabel('Standard resistor').selectOption({ label: 'KV-R25-01 · 25 Ω' });
	await expect(details.getByLabel('Fixed point')).toHaveValue('Ga');
	await setTheme(page, 'light');
	await screenshot(page, 'upload-mapping-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'upload-mapping-dark');
	await setTheme(page, 'light');

	await page.getByTestId('upload-send').click();
	const errors = page.getByTestId('row-errors');
	await expect(errors).toBeVisible();
	await expect(errors).toContainText('3 rows could not be read');
	const listed = page.getByTestId('row-error');
	await expect(listed).toHaveCount(3);
	await expect(listed.nth(0)).toContainText('5');
	await expect(listed.nth(0)).toContainText('Bridge ratio');
	await expect(listed.nth(1)).toContainText('9');
	await expect(listed.nth(1)).toContainText('Current');
	await expect(listed.nth(2)).toContainText('14');
	await expect(listed.nth(2)).toContainText('no such day in that month');
	await expect(page.getByTestId('upload-review')).toContainText('17 good rows');
	await expect(page.getByTestId('upload-confirm')).toBeDisabled();
	await screenshot(page, 'upload-errors-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'upload-errors-dark');
	await setTheme(page, 'light');

	await page.getByTestId('upload-skip').check();
	await page.getByTestId('upload-confirm').click();
	const done = page.getByTestId('upload-done');
	await expect(done).toBeVisible();
	const runId = (await done.locator('h2').textContent())!.match(/#(\d+)/)![1];
	await expect(done).toContainText('3 bad rows skipped');

	await page.goto('/runs');
	const row = page.getByTestId('runs-table').locator('tr').filter({ hasText: `#${runId}` });
	await expect(row).toContainText('Gallium melting point');
	await expect(row).toContainText('Finished');
	await expect(row).toContainText('KV-Ga-07');
	await expect(row.locator('td').last()).toHaveText('17');
});

test('a technician may not open the upload page', async ({ page }) => {
	await signInAs(page, 'technician');
	const res = await page.goto('/runs/upload');
	expect(res?.status()).toBe(403);
});
