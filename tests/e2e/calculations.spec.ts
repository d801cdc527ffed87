import { expect, test } from '@playwright/test';
import { screenshot, signInAs } from './helpers';

test('an engineer converts a resistance to T90 with typed-in coefficients and reads the equations with their sources', async ({ page }) => {
	await signInAs(page, 'engineer');
	await page.getByRole('link', { name: 'Calculations', exact: true }).click();
	const calc = page.getByTestId('calculator');
	// NIST SP 250-81 example (shared/reference/its90-data.md): TPW–Sn–Zn, R_TPW 25.319871 Ω,
	// a = −1.2134e-4, b = −9.9190e-6; R = 65.039218 Ω is 419.527 °C.
	await calc.getByLabel('Thermometer').selectOption('custom');
	await calc.getByLabel('Sub-range').selectOption('TPW-Sn-Zn');
	await calc.getByLabel('a', { exact: true }).fill('-1.2134e-4');
	await calc.getByLabel('b', { exact: true }).fill('-9.9190e-6');
	await calc.getByTestId('calc-input').fill('65.039218');
	await calc.getByTestId('calc-rtpw').fill('25.319871');
	const celsius = Number(await calc.getByTestId('calc-t90c').textContent());
	expect(Math.abs(celsius - 419.527)).toBeLessThan(1e-4);

	// A demo SPRT's stored calibration fills the coefficients.
	await calc.getByLabel('Thermometer').selectOption({ label: 'KV-S-4471 · calibration v1 · TPW-Sn-Zn' });
	await expect(calc.getByLabel('a', { exact: true })).toHaveValue('-0.00011873');

	// Impossible input gets a sentence, not a number.
	await calc.getByLabel('From').selectOption('w-to-t');
	await calc.getByTestId('calc-input').fill('-2');
	await expect(calc.getByTestId('calc-error')).toBeVisible();

	const equations = page.getByTestId('equations');
	await expect(equations).toContainText('Preston-Thomas');
	await expect(equations).toContainText('NIST');
	await screenshot(page, 'calculations-engineer-light');
});
