import { expect, test } from '@playwright/test';
import { screenshot, setTheme, signInAs } from './helpers';

test('an engineer overlays the tin plateaux of one cell and reads their table', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/compare');
	const form = page.getByTestId('compare-form');
	await form.getByLabel('Fixed point').selectOption('Sn');
	await form.getByRole('button', { name: 'Compare' }).click();
	await expect(page).toHaveURL(/point=Sn/);
	const choices = page.getByTestId('run-choices').getByRole('checkbox');
	await expect(choices).toHaveCount(3);
	for (const c of await choices.all()) await c.check();
	await form.getByRole('button', { name: 'Compare' }).click();
	await expect(page.getByTestId('overlay-chart').locator('canvas')).toBeVisible();
	const rows = page.getByTestId('compare-row');
	await expect(rows).toHaveCount(3);
	// every value with a sign and three decimals, and a U beside it; slopes carry their ± u
	for (const text of await rows.allTextContents()) {
		expect(text).toMatch(/KV-Sn-11/);
		expect(text).toMatch(/[+−]?\d\.\d{3}/);
		expect(text).toMatch(/±/);
	}
	await expect(page.getByTestId('overlay')).toContainText('mK from the assigned value');
	await screenshot(page, 'compare-overlay-engineer-light');

	// aligned by fraction, against the oldest run as the reference: the reference reads 0.000
	await form.getByLabel('fraction melted or frozen').check();
	const oldest = (await page.getByTestId('run-choices').getByRole('checkbox').last().getAttribute('value'))!;
	await form.getByLabel('Reference').selectOption(oldest);
	await form.getByRole('button', { name: 'Compare' }).click();
	await expect(page).toHaveURL(/align=fraction/);
	await expect(page.getByTestId('overlay')).toContainText(`mK from run #${oldest}`);
	const refRow = page.getByTestId('compare-row').filter({ hasText: `#${oldest}` });
	await expect(refRow.locator('td').nth(3)).toHaveText('0.000');
	await setTheme(page, 'dark');
	await screenshot(page, 'compare-overlay-fraction-engineer-dark');
});

test('an engineer opens a cell history control chart and the cell-to-cell comparison', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/compare');
	await page.getByTestId('cell-histories').getByRole('link', { name: 'KV-Zn-05' }).click();
	await expect(page).toHaveURL(/\/compare\/cells\/\d+/);
	await expect(page.getByTestId('cell-chart').locator('canvas')).toBeVisible();
	const rows = page.getByTestId('realization-row');
	// KV-Zn-05 holds six finished zinc freezes in the demo history
	await expect(rows).toHaveCount(6);
	await expect(page.getByTestId('control-limits')).toContainText('n = 6');
	await expect(page.getByTestId('control-limits')).toContainText('±2σ');
	const pair = page.getByTestId('cell-pair');
	await expect(pair).toHaveCount(1);
	await expect(pair).toContainText('KV-Zn-05 − KV-Zn-09');
	await expect(pair).toContainText('KV-S-4471');
	await expect(pair).toContainText(/mK ± \d\.\d{3} mK/);
	await screenshot(page, 'cell-history-engineer-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'cell-history-engineer-dark');
});

test('an engineer looks at an immersion profile against the hydrostatic line', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.goto('/compare');
	await page.getByTestId('immersion-runs').getByRole('link').first().click();
	await expect(page).toHaveURL(/\/compare\/immersion\/\d+/);
	await expect(page.getByTestId('immersion-chart').locator('canvas')).toBeVisible();
	const steps = page.getByTestId('immersion-step');
	await expect(steps).toHaveCount(6);
	// the line column is dT/dl × Δh of ITS-90 Table 2 for zinc, 2.7 mK/m: −0.027 mK per cm raised
	await expect(steps.nth(0).locator('td').nth(2)).toHaveText('0.0000');
	await expect(steps.nth(1).locator('td').nth(0)).toHaveText('170');
	await expect(steps.nth(1).locator('td').nth(2)).toHaveText('−0.0270');
	await expect(steps.nth(5).locator('td').nth(2)).toHaveText('−0.1350');
	await expect(page.getByTestId('immersion-verdict')).toContainText(/hydrostatic line/);
	await screenshot(page, 'immersion-profile-engineer-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'immersion-profile-engineer-dark');
});

test('a technician may not open the comparison pages', async ({ page }) => {
	await signInAs(page, 'technician');
	for (const path of ['/compare', '/compare/cells/1', '/compare/immersion/1']) {
		const res = await page.goto(path);
		expect(res?.status()).toBe(403);
	}
	await expect(page.getByRole('navigation', { name: 'Areas' }).getByRole('link', { name: 'Compare', exact: true })).toHaveCount(0);
});
