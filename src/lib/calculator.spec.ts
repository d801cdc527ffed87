import { describe, expect, it } from 'vitest';
import { calculate } from './calculator';

describe('W ↔ T90 calculator', () => {
	it('reproduces the NIST SP 250-81 example (TPW–Sn–Zn, R_TPW 25.319871 Ω): R = 47.922451 Ω is 231.928 °C', () => {
		// NIST SP 250-81 worked example, as given in shared/reference/its90-data.md.
		const out = calculate({ direction: 'r-to-t', resistanceOhm: 47.922451, rTpwOhm: 25.319871, subrange: 'TPW-Sn-Zn', coefficients: { a: -1.2134e-4, b: -9.919e-6 } });
		expect(out.ok).toBe(true);
		if (out.ok) expect(Math.abs(out.result.t90Celsius - 231.928)).toBeLessThan(1e-4);
	});

	it('gives W_r of the zinc point for an ideal thermometer at 692.677 K (ITS-90 Table 1: 2.56891730)', () => {
		const out = calculate({ direction: 't-to-w', t90Kelvin: 692.677, subrange: null, coefficients: { a: 0 } });
		expect(out.ok && Math.abs(out.result.w - 2.5689173)).toBeLessThan(5e-8);
	});

	it('turns the dW_r/dT at the triple point of water into a sensitivity of 1/3.98853e-3 K per unit W', () => {
		// its90-data.md: dW_r/dT = 3.98853e-3 per K at 273.16 K.
		const out = calculate({ direction: 'w-to-t', w: 1, subrange: null, coefficients: { a: 0 } });
		expect(out.ok && Math.abs(out.result.sensitivityKelvinPerW - 1 / 3.98853e-3)).toBeLessThan(0.01);
	});

	it('says what is wrong instead of returning a number for impossible input', () => {
		const neg = calculate({ direction: 'w-to-t', w: -0.5, subrange: null, coefficients: { a: 0 } });
		expect(neg.ok).toBe(false);
		const noTpw = calculate({ direction: 'r-to-t', resistanceOhm: 30, rTpwOhm: 0, subrange: null, coefficients: { a: 0 } });
		expect(noTpw).toEqual({ ok: false, message: 'R_TPW must be a resistance above 0 Ω.' });
		const missing = calculate({ direction: 'w-to-t', w: 1.5, subrange: 'TPW-Sn-Zn', coefficients: { a: -1e-4 } });
		expect(missing.ok).toBe(false);
		if (!missing.ok) expect(missing.message).toMatch(/b/);
	});
});
