import { expect, test } from '@playwright/test';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { screenshot, setTheme, signInAs } from './helpers';

test('an engineer calibrates KV-S-4471 from its signed-off tin and zinc runs, stores it and downloads the report', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/calibrations');
	await expect(page.getByTestId('review-note')).toContainText('quality system');
	const pick = page.getByTestId('calibration-pick');
	await pick.getByLabel('Thermometer').selectOption({ label: 'KV-S-4471 (SPRT, v1 current)' });
	await expect(pick.getByLabel('Sub-range')).toHaveValue('TPW-Sn-Zn');
	await pick.getByRole('button', { name: 'Propose runs' }).click();
	await expect(page).toHaveURL(/thermometer=\d+&subrange=TPW-Sn-Zn/);

	const proposed = page.getByTestId('proposed-run');
	await expect(proposed).toHaveCount(2);
	await expect(proposed.nth(0)).toContainText('Tin freezing point');
	await expect(proposed.nth(0)).toContainText('KV-Sn-11');
	await expect(proposed.nth(1)).toContainText('Zinc freezing point');
	// measured W at the tin point is near the Table 1 W_r (1.89279768) for an SPRT with a ≈ −1.2e-4
	const wSn = Number((await proposed.nth(0).locator('td').nth(4).textContent())!.trim());
	expect(Math.abs(wSn - 1.8928)).toBeLessThan(1e-3);
	const a = page.getByTestId('coefficient-a');
	await expect(a).toContainText('× 10⁻⁴');
	await expect(page.getByTestId('coefficient-b')).toContainText('× 10⁻⁵');
	await expect(page.getByTestId('residuals')).toContainText('TPW');
	for (const cell of await page.getByTestId('residuals').locator('tbody td:last-child').allTextContents()) expect(Math.abs(parseFloat(cell.replace('−', '-')))).toBeLessThan(1e-5);
	await expect(page.locator('[data-testid="table-row"][data-point="Sn"]')).toContainText('231.928');
	await expect(page.getByTestId('uncertainty')).toContainText('U, k = 2 (mK)');
	await screenshot(page, 'calibration-preview-engineer-light');

	// The newest signed-off zinc run is on KV-Zn-09; swap it for one on KV-Zn-05: the coefficients change.
	await expect(proposed.nth(1)).toContainText('KV-Zn-09');
	const before = await a.textContent();
	const swap = page.getByTestId('swap-Zn');
	const options = await swap.locator('option').allTextContents();
	expect(options.length).toBeGreaterThan(1);
	const other = options.find((o) => o.includes('KV-Zn-05'))!;
	await swap.selectOption({ label: other });
	await pick.getByRole('button', { name: 'Recompute' }).click();
	await expect(proposed.nth(1)).toContainText('KV-Zn-05');
	await expect(a).not.toHaveText(before!);

	await page.getByTestId('store-form').getByLabel('Notes').fill('Annual recalibration from the bench history');
	await page.getByTestId('store').click();
	await expect(page).toHaveURL(/\/calibrations\/\d+\?stored=1/);
	await expect(page.getByTestId('stored')).toContainText('version 2');
	await expect(page.getByTestId('report-status')).toHaveText('current');
	await expect(page.getByTestId('report-runs')).toContainText('KV-Zn-05');
	const storedA = (await page.getByTestId('coefficient-a').textContent())!.trim();
	await screenshot(page, 'calibration-report-engineer-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'calibration-report-engineer-dark');

	// The list shows v2 current and v1 superseded.
	await page.goto('/calibrations');
	const rows = page.getByTestId('version-row').filter({ hasText: 'KV-S-4471' });
	await expect(rows).toHaveCount(2);
	await expect(rows.nth(0)).toContainText('v2');
	await expect(rows.nth(0)).toContainText('current');
	await expect(rows.nth(1)).toContainText('superseded');
	await rows.nth(0).getByRole('link').click();

	const download = page.waitForEvent('download');
	await page.getByTestId('pdf-download').click();
	const file = await (await download).path();
	const bytes = readFileSync(file);
	expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
	const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
	expect(text).toContain('KV-S-4471');
	// the page shows a as m × 10⁻⁴; the PDF prints the same mantissa as m × 10^−4
	const mantissa = storedA.split(' ')[0];
	expect(text).toContain(`${mantissa} × 10^−4`);
	expect(text).toContain('TPW-Sn-Zn');
	expect(text).toContain('quality system');
	execFileSync('pdftoppm', ['-r', '70', '-png', '-f', '1', '-l', '2', file, 'test-artifacts/screens/calibration-report-pdf']);
});

test('the PDF endpoint answers with a PDF attachment, and a technician gets 403 on calibrations', async ({ page, request }) => {
	await signInAs(page, 'engineer');
	await page.goto('/calibrations');
	const href = await page.getByTestId('version-row').first().getByRole('link').getAttribute('href');
	const res = await page.request.get(`${href}/report.pdf`);
	expect(res.status()).toBe(200);
	expect(res.headers()['content-type']).toBe('application/pdf');
	expect(res.headers()['content-disposition']).toMatch(/^attachment; filename="calibration-.+-v\d+\.pdf"$/);
	void request;

	await page.context().clearCookies();
	await signInAs(page, 'technician');
	for (const path of ['/calibrations', href!, `${href}/report.pdf`]) {
		const r = await page.goto(path).catch(() => null);
		if (r) expect(r.status()).toBe(403);
		else expect((await page.request.get(path)).status()).toBe(403);
	}
	await expect(page.getByRole('navigation', { name: 'Areas' }).getByRole('link', { name: 'Calibrations', exact: true })).toHaveCount(0);
});
