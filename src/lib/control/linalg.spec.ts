import { describe, expect, it } from 'vitest';
import { expm, identity, matMul, solve, zeros, type Matrix } from './linalg';

const mat = (rows: number[][]): Matrix => {
	const m = zeros(rows.length, rows[0].length);
	rows.forEach((r, i) => r.forEach((v, j) => (m.data[i * m.cols + j] = v)));
	return m;
};

// Closed forms of e^(At) are standard results (e.g. Golub & Van Loan, Matrix Computations, 4th ed., §9.3; common practice).
describe('matrix exponential', () => {
	it('rotation: exp([[0, t], [−t, 0]]) = [[cos t, sin t], [−sin t, cos t]]', () => {
		for (const t of [0.1, 1, 3, 10, 100]) {
			const e = expm(mat([[0, t], [-t, 0]]));
			expect(e.data[0]).toBeCloseTo(Math.cos(t), 12);
			expect(e.data[1]).toBeCloseTo(Math.sin(t), 12);
			expect(e.data[2]).toBeCloseTo(-Math.sin(t), 12);
		}
	});

	it('Jordan block: exp([[λ, 1], [0, λ]]) = e^λ·[[1, 1], [0, 1]]', () => {
		const e = expm(mat([[-2, 1], [0, -2]]));
		expect(e.data[0] / Math.exp(-2)).toBeCloseTo(1, 14);
		expect(e.data[1] / Math.exp(-2)).toBeCloseTo(1, 14);
		expect(e.data[2]).toBe(0);
	});

	it('stiff diagonal: exp(diag(−1000, −0.001)) with the slow mode to 1e-12 relative', () => {
		// Squaring 11 times costs a few digits on the slow mode ("overscaling", Higham, SIAM J.
		// Matrix Anal. Appl. 26 (2005) 1179–1193); 1e-12 is ample for step discretisation.
		const e = expm(mat([[-1000, 0], [0, -0.001]]));
		expect(Math.abs(e.data[0] - Math.exp(-1000))).toBeLessThan(1e-300);
		expect(Math.abs(e.data[3] / Math.exp(-0.001) - 1)).toBeLessThan(1e-12);
	});

	it('nilpotent 5×5: e^N = I + N + N²/2 + N³/6 + N⁴/24 exactly (the series ends; common practice), small and large norms', () => {
		for (const size of [0.05, 0.4, 3]) {
			const rows = [0, 1, 2, 3, 4].map((i) => [0, 1, 2, 3, 4].map((j) => (j > i ? size * (1 + ((i * 5 + j) % 4)) * (j % 2 ? -1 : 1) : 0)));
			const n = mat(rows);
			let term = identity(5);
			const ref = identity(5).data.slice();
			for (let k = 1; k <= 4; k++) {
				term = matMul(term, n);
				for (let i = 0; i < 25; i++) ref[i] += term.data[i] / [1, 1, 2, 6, 24][k];
			}
			const e = expm(n).data;
			const scale = Math.max(...ref.map(Math.abs));
			for (let i = 0; i < 25; i++) expect(Math.abs(e[i] - ref[i])).toBeLessThan(1e-13 * scale);
		}
	});

	it('e^A·e^(−A) = I for a non-normal 3×3 matrix', () => {
		const a = mat([[-1, 5, 0], [0, -2, 7], [0.3, 0, -0.5]]);
		const minus = mat([[1, -5, 0], [0, 2, -7], [-0.3, 0, 0.5]]);
		const p = matMul(expm(a), expm(minus));
		const i3 = identity(3);
		for (let k = 0; k < 9; k++) expect(Math.abs(p.data[k] - i3.data[k])).toBeLessThan(1e-12);
	});
});

describe('LU solve', () => {
	it('solves a pivoting-requiring system and rejects a singular one', () => {
		const x = solve(mat([[0, 1], [1, 1]]), mat([[2], [3]]));
		expect(Array.from(x.data)).toEqual([1, 2]);
		expect(() => solve(mat([[1, 2], [2, 4]]), mat([[1], [1]]))).toThrow(/singular/);
	});
});
