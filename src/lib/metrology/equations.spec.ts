import { describe, expect, it } from 'vitest';
import { EQUATIONS } from './equations';

describe('equations list for the "about the calculations" page', () => {
	it('ids are unique, every entry has a formula, a source and a known provenance', () => {
		const ids = EQUATIONS.map((e) => e.id);
		expect(new Set(ids).size).toBe(ids.length);
		for (const e of EQUATIONS) {
			expect(e.formula.length).toBeGreaterThan(5);
			expect(e.source.length).toBeGreaterThan(5);
			expect(['published', 'memory', 'common practice']).toContain(e.provenance);
		}
	});
	it('lists the four reference functions with their ITS-90 equation numbers', () => {
		for (const n of ['9a', '9b', '10a', '10b']) {
			const e = EQUATIONS.find((x) => x.id === `its90-${n}`);
			expect(e?.source).toContain(`Eq. (${n})`);
			expect(e?.source).toContain('Metrologia 27');
		}
	});
});
