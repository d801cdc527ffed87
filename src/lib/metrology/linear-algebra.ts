// A tiny dense solver: the deviation-function systems are at most 3x3, so Gaussian elimination with
// partial pivoting is exact enough and needs no library.

import { MetrologyError } from './errors';

/** Solves M x = rhs. Inputs are not modified. Throws singular_system when a pivot vanishes. */
export function solveLinearSystem(matrix: readonly (readonly number[])[], rhs: readonly number[]): number[] {
	const n = rhs.length;
	if (matrix.length !== n || matrix.some((row) => row.length !== n)) {
		throw new MetrologyError('invalid_input', `solveLinearSystem: expected a ${n}x${n} matrix`, { n });
	}
	const m = matrix.map((row, i) => [...row, rhs[i]]);
	const scale = Math.max(1e-300, ...m.flat().map(Math.abs));
	for (let col = 0; col < n; col++) {
		let pivot = col;
		for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
		if (!(Math.abs(m[pivot][col]) > 1e-14 * scale)) {
			throw new MetrologyError('singular_system', `solveLinearSystem: matrix is singular (column ${col})`, { column: col });
		}
		[m[col], m[pivot]] = [m[pivot], m[col]];
		for (let r = col + 1; r < n; r++) {
			const factor = m[r][col] / m[col][col];
			for (let c = col; c <= n; c++) m[r][c] -= factor * m[col][c];
		}
	}
	const x = new Array<number>(n).fill(0);
	for (let r = n - 1; r >= 0; r--) {
		let s = m[r][n];
		for (let c = r + 1; c < n; c++) s -= m[r][c] * x[c];
		x[r] = s / m[r][r];
	}
	return x;
}
