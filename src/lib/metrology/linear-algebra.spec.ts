import { describe, expect, it } from 'vitest';
import { solveLinearSystem } from './linear-algebra';

describe('Gaussian elimination with partial pivoting', () => {
	it('solves a 3×3 system that needs a row swap (zero first pivot), by hand x = (1, 2, 3)', () => {
		// 0x + 2y + 1z = 7; 1x + 1y + 1z = 6; 2x + 1y + 3z = 13
		const x = solveLinearSystem([[0, 2, 1], [1, 1, 1], [2, 1, 3]], [7, 6, 13]);
		expect(x[0]).toBeCloseTo(1, 13);
		expect(x[1]).toBeCloseTo(2, 13);
		expect(x[2]).toBeCloseTo(3, 13);
	});
	it('does not modify its inputs', () => {
		const a = [[2, 1], [1, 3]];
		const b = [3, 5];
		solveLinearSystem(a, b);
		expect(a).toEqual([[2, 1], [1, 3]]);
		expect(b).toEqual([3, 5]);
	});
});
