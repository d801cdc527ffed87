import { expect, test, type Page } from '@playwright/test';
import { readFileSync } from 'node:fs';
import { screenshot, setTheme, signInAs } from './helpers';

// dW_r/dT at 273.16 K from the ITS-90 reference function (3.98853e-3 /K): 1 mK on R_TPW ≙ R_TPW × 3.98853e-6 Ω.
const SLOPE_PER_KELVIN = 3.98853e-3;

async function canvasInk(page: Page, testid: string): Promise<number> {
	return page.getByTestId(testid).locator('canvas').evaluate((c: HTMLCanvasElement) => {
		const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
		let n = 0;
		for (let i = 3; i < d.length; i += 4) if (d[i] > 0) n++;
		return n;
	});
}

test('an engineer reads a thermometer’s R_TPW history and a check past the limit is flagged', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/thermometers');
	await page.getByRole('link', { name: 'KV-S-4471' }).click();
	await expect(page).toHaveURL(/\/thermometers\/\d+$/);
	await expect(page.getByRole('heading', { name: 'SPRT KV-S-4471' })).toBeVisible();

	// The chart is drawn, with the ±0.2 mK limit lines around the reference.
	const chart = page.getByTestId('rtpw-chart');
	await expect(chart).toHaveAttribute('aria-label', /±0\.2 mK limits/);
	await expect(chart).toHaveAttribute('data-series', /\+0\.2 mK limit \| −0\.2 mK limit/);
	await expect.poll(() => canvasInk(page, 'rtpw-chart')).toBeGreaterThan(2000);
	await expect(page.getByTestId('rtpw-row')).toHaveCount(16);
	// The demo history creeps slowly: no consecutive pair is 0.2 mK apart.
	await expect(page.getByTestId('rtpw-stable')).toBeVisible();
	await expect(page.getByTestId('calibration')).toContainText('TPW-Sn-Zn');
	// The demo calibration's R_TPW (25.548312 Ω), or a newer version's made by the calibration test in the same database.
	await expect(page.getByTestId('calibration')).toContainText(/R_TPW\s*25\.54831\d+ Ω/);
	await setTheme(page, 'light');
	await screenshot(page, 'thermometer-history-light');

	// A new check 0.5 mK (equivalent) above the latest one.
	const latestText = (await page.getByTestId('rtpw-row').first().locator('td').nth(1).textContent())!.trim();
	const latest = Number(latestText);
	const jumped = latest + latest * SLOPE_PER_KELVIN * 0.5e-3;
	const form = page.getByTestId('rtpw-form');
	await form.getByLabel('R_TPW (Ω)').fill(jumped.toFixed(7));
	await form.getByLabel('Note').fill('after transport');
	await form.getByRole('button', { name: 'Add check' }).click();
	await expect(page.getByRole('status')).toContainText('R_TPW check of');

	const flag = page.getByTestId('rtpw-flag');
	await expect(flag).toBeVisible();
	await expect(flag).toContainText('more than 0.2 mK');
	await expect(flag).toContainText('+0.500 mK');
	const newest = page.getByTestId('rtpw-row').first();
	await expect(newest).toHaveAttribute('data-flagged', 'true');
	await expect(newest).toContainText('over limit');
	await expect(newest).toContainText('after transport');
	await expect(page.getByTestId('rtpw-row')).toHaveCount(17);
	await screenshot(page, 'thermometer-history-flagged-light');
	await setTheme(page, 'dark');
	await expect.poll(() => canvasInk(page, 'rtpw-chart')).toBeGreaterThan(2000);
	await screenshot(page, 'thermometer-history-flagged-dark');
	await setTheme(page, 'light');
});

test('an engineer attaches a PDF assay to a cell and downloads it', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/cells');
	await page.getByRole('link', { name: 'KV-Ga-07' }).click();
	await expect(page.getByRole('heading', { name: 'Cell KV-Ga-07' })).toBeVisible();
	await expect(page.getByTestId('cell-facts')).toContainText('165 mm');
	await expect(page.getByTestId('cell-history-link')).toHaveAttribute('href', /\/compare\/cells\/\d+$/);

	const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
	const form = page.getByTestId('attach-form');
	await form.getByLabel('PDF file').setInputFiles({ name: 'KV-Ga-07 assay.pdf', mimeType: 'application/pdf', buffer: pdf });
	await form.getByLabel('Kind').selectOption('assay');
	await form.getByLabel('Title (optional)').fill('Supplier assay, lot 7');
	await form.getByRole('button', { name: 'Attach' }).click();
	const row = page.getByTestId('document-row').filter({ hasText: 'Supplier assay, lot 7' });
	await expect(row).toBeVisible();
	await expect(row).toContainText('assay');

	const [download] = await Promise.all([page.waitForEvent('download'), row.getByRole('link', { name: 'Supplier assay, lot 7' }).click()]);
	expect(download.suggestedFilename()).toBe('KV-Ga-07 assay.pdf');
	expect(readFileSync((await download.path())!).equals(pdf)).toBe(true);

	await setTheme(page, 'light');
	await screenshot(page, 'cell-detail-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'cell-detail-dark');
	await setTheme(page, 'light');
});

test('a technician reads a thermometer and a cell but gets no forms to change them', async ({ page }) => {
	await signInAs(page, 'technician');
	await page.goto('/thermometers');
	await page.getByRole('link', { name: 'KV-S-6020' }).click();
	await expect(page.getByTestId('rtpw-chart')).toBeVisible();
	await expect(page.getByTestId('rtpw-form')).toHaveCount(0);
	await expect(page.getByTestId('attach-form')).toHaveCount(0);
	await expect(page.getByTestId('documents')).toBeVisible();
	expect((await page.goto('/thermometers/999999'))?.status()).toBe(404);
});
