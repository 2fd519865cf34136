/**
 * Small dense linear algebra on row-major Float64Array matrices, for the control engine:
 * products, LU solves, balancing, the matrix exponential and Hessenberg QR eigenvalues.
 * Sizes here are small (n ≤ ~40), so the plain O(n³) algorithms are the right tools.
 */
import { modulus } from './complex';
import { SLOT, scratch } from './workspace';

/** A square or rectangular matrix stored row-major: element (i, j) at data[i * cols + j]. */
export interface Matrix {
	rows: number;
	cols: number;
	data: Float64Array;
}

/** A new rows×cols zero matrix. */
export function zeros(rows: number, cols: number): Matrix {
	return { rows, cols, data: new Float64Array(rows * cols) };
}

/** The n×n identity matrix. */
export function identity(n: number): Matrix {
	const m = zeros(n, n);
	for (let i = 0; i < n; i++) m.data[i * n + i] = 1;
	return m;
}

/** C = A·B (shapes must agree). */
export function matMul(a: Matrix, b: Matrix): Matrix {
	if (a.cols !== b.rows) throw new Error(`matMul: shape mismatch ${a.rows}x${a.cols} · ${b.rows}x${b.cols}`);
	const c = zeros(a.rows, b.cols);
	const n = a.rows;
	const m = b.cols;
	const k = a.cols;
	const ad = a.data;
	const bd = b.data;
	const cd = c.data;
	for (let i = 0; i < n; i++) {
		for (let p = 0; p < k; p++) {
			const aip = ad[i * k + p];
			if (aip === 0) continue;
			const bo = p * m;
			const co = i * m;
			for (let j = 0; j < m; j++) cd[co + j] += aip * bd[bo + j];
		}
	}
	return c;
}

/** y = A·x for a matrix A and a vector x. */
export function matVec(a: Matrix, x: ArrayLike<number>): Float64Array {
	const y = new Float64Array(a.rows);
	for (let i = 0; i < a.rows; i++) {
		let s = 0;
		const o = i * a.cols;
		for (let j = 0; j < a.cols; j++) s += a.data[o + j] * x[j];
		y[i] = s;
	}
	return y;
}

/** Infinity norm (maximum absolute row sum). */
export function normInf(a: Matrix): number {
	let best = 0;
	for (let i = 0; i < a.rows; i++) {
		let s = 0;
		for (let j = 0; j < a.cols; j++) s += Math.abs(a.data[i * a.cols + j]);
		if (s > best) best = s;
	}
	return best;
}

/**
 * Solves A·X = B (into `out` when given) by LU with partial pivoting (Golub & Van Loan, Matrix
 * Computations, 4th ed., Alg. 3.4.1). Throws when A is singular to working precision.
 */
export function solve(a: Matrix, b: Matrix, out?: Float64Array): Matrix {
	const n = a.rows;
	if (a.cols !== n || b.rows !== n) throw new Error('solve: shape mismatch');
	// The factors are a temporary (scratch); the solution goes to `out` (same size as B) or a fresh array.
	const lu = scratch(SLOT.solveLu, n * n);
	lu.set(a.data.length === n * n ? a.data : a.data.subarray(0, n * n));
	const x = out ?? new Float64Array(b.data.length);
	x.set(b.data);
	const m = b.cols;
	let scale = 0;
	for (let i = 0; i < lu.length; i++) scale = Math.max(scale, Math.abs(lu[i]));
	for (let k = 0; k < n; k++) {
		let p = k;
		let best = Math.abs(lu[k * n + k]);
		for (let i = k + 1; i < n; i++) {
			const v = Math.abs(lu[i * n + k]);
			if (v > best) {
				best = v;
				p = i;
			}
		}
		if (!(best > scale * 1e-300) || best === 0) throw new Error('solve: matrix is singular');
		if (p !== k) {
			for (let j = 0; j < n; j++) {
				const t = lu[k * n + j];
				lu[k * n + j] = lu[p * n + j];
				lu[p * n + j] = t;
			}
			for (let j = 0; j < m; j++) {
				const t = x[k * m + j];
				x[k * m + j] = x[p * m + j];
				x[p * m + j] = t;
			}
		}
		const pivot = lu[k * n + k];
		for (let i = k + 1; i < n; i++) {
			const f = lu[i * n + k] / pivot;
			if (f === 0) continue;
			lu[i * n + k] = f;
			for (let j = k + 1; j < n; j++) lu[i * n + j] -= f * lu[k * n + j];
			for (let j = 0; j < m; j++) x[i * m + j] -= f * x[k * m + j];
		}
	}
	for (let k = n - 1; k >= 0; k--) {
		const pivot = lu[k * n + k];
		for (let j = 0; j < m; j++) {
			let s = x[k * m + j];
			for (let i = k + 1; i < n; i++) s -= lu[k * n + i] * x[i * m + j];
			x[k * m + j] = s / pivot;
		}
	}
	return { rows: n, cols: m, data: x };
}

/** out = a·b for n×n row-major arrays (out must not alias a or b). */
function mulInto(a: Float64Array, b: Float64Array, out: Float64Array, n: number): void {
	out.fill(0);
	for (let i = 0; i < n; i++) {
		const io = i * n;
		for (let p = 0; p < n; p++) {
			const v = a[io + p];
			if (v === 0) continue;
			const po = p * n;
			for (let j = 0; j < n; j++) out[io + j] += v * b[po + j];
		}
	}
}

/**
 * Matrix exponential e^A by scaling and squaring with the diagonal [6/6] Padé approximant
 * (Golub & Van Loan, Matrix Computations, 4th ed., Alg. 9.3.1; A is scaled so ‖A/2^s‖∞ ≤ 1/2,
 * where the [6/6] approximant is accurate to about 1e-16 relative). The approximant is formed
 * from its even and odd parts, p(X) = V + U and q(X) = V − U with V = Σ c_2k·X^2k and
 * U = X·Σ c_2k+1·X^2k (Higham, SIAM J. Matrix Anal. Appl. 26 (2005) 1179–1193, §2), in four
 * matrix products instead of six. Works in a few preallocated buffers (it runs on every
 * recompute of the bench). The result goes to `out` (n² elements) when given, else a fresh array.
 */
export function expm(a: Matrix, out?: Float64Array): Matrix {
	const n = a.rows;
	if (a.cols !== n) throw new Error('expm: matrix must be square');
	const norm = normInf(a);
	if (!Number.isFinite(norm)) throw new Error('expm: non-finite matrix');
	const s = norm > 0.5 ? Math.max(0, Math.ceil(Math.log2(norm / 0.5))) : 0;
	const scale = Math.pow(2, -s);
	const nn = n * n;
	// Temporaries in scratch arrays (see workspace.ts); the result is a fresh array.
	const x = scratch(SLOT.expmX, nn);
	for (let i = 0; i < nn; i++) x[i] = a.data[i] * scale;
	// Padé coefficients c_j = (2q − j)! q! / ((2q)! j! (q − j)!) for q = 6.
	const q = 6;
	const c = [1];
	for (let j = 1; j <= q; j++) c.push((c[j - 1] * (q - j + 1)) / (j * (2 * q - j + 1)));
	const x2 = scratch(SLOT.expmX2, nn);
	const x4 = scratch(SLOT.expmX4, nn);
	const x6 = scratch(SLOT.expmX6, nn);
	mulInto(x, x, x2, n);
	mulInto(x2, x2, x4, n);
	mulInto(x4, x2, x6, n);
	// odd = c1·I + c3·X² + c5·X⁴ (then U = X·odd); V = c0·I + c2·X² + c4·X⁴ + c6·X⁶.
	const odd = scratch(SLOT.expmOdd, nn);
	const v = scratch(SLOT.expmEven, nn);
	for (let i = 0; i < nn; i++) {
		odd[i] = c[3] * x2[i] + c[5] * x4[i];
		v[i] = c[2] * x2[i] + c[4] * x4[i] + c[6] * x6[i];
	}
	for (let i = 0; i < n; i++) {
		odd[i * n + i] += c[1];
		v[i * n + i] += c[0];
	}
	const u = x2; // X² is no longer needed: reuse its buffer for U.
	mulInto(x, odd, u, n);
	const numer = x4;
	const denom = x6;
	for (let i = 0; i < nn; i++) {
		numer[i] = v[i] + u[i];
		denom[i] = v[i] - u[i];
	}
	const result = solve({ rows: n, cols: n, data: denom }, { rows: n, cols: n, data: numer }, out).data;
	let e: Float64Array = result;
	let tmp: Float64Array = odd;
	for (let k = 0; k < s; k++) {
		mulInto(e, e, tmp, n);
		const t = e;
		e = tmp;
		tmp = t;
	}
	if (e !== result) result.set(e);
	return { rows: n, cols: n, data: result };
}

/**
 * Balances a square matrix in place by a diagonal similarity with powers of 2 so that row and
 * column norms are comparable (Parlett & Reinsch 1969, as in EISPACK `balanc`; Golub & Van Loan
 * §7.5.7). Returns the diagonal scaling d (A ← D⁻¹·A·D).
 */
export function balance(a: Matrix): Float64Array {
	const n = a.rows;
	const d = new Float64Array(n).fill(1);
	const radix = 2;
	const sqrdx = radix * radix;
	let done = false;
	let guard = 0;
	while (!done && guard++ < 100) {
		done = true;
		for (let i = 0; i < n; i++) {
			let r = 0;
			let c = 0;
			for (let j = 0; j < n; j++) {
				if (j === i) continue;
				c += Math.abs(a.data[j * n + i]);
				r += Math.abs(a.data[i * n + j]);
			}
			if (c === 0 || r === 0) continue;
			let g = r / radix;
			let f = 1;
			const s = c + r;
			while (c < g) {
				f *= radix;
				c *= sqrdx;
			}
			g = r * radix;
			while (c > g) {
				f /= radix;
				c /= sqrdx;
			}
			if ((c + r) / f < 0.95 * s) {
				done = false;
				g = 1 / f;
				d[i] *= f;
				for (let j = 0; j < n; j++) a.data[i * n + j] *= g;
				for (let j = 0; j < n; j++) a.data[j * n + i] *= f;
			}
		}
	}
	return d;
}

/**
 * Eigenvalues of an upper Hessenberg matrix by the Francis implicit double-shift QR iteration
 * with exceptional shifts (Golub & Van Loan, Matrix Computations, 4th ed., Alg. 7.5.1–7.5.2;
 * EISPACK `hqr`). H is overwritten. Returns false when an eigenvalue needs more than 120 sweeps.
 */
export function hessenbergEigenvalues(h: Matrix, wr: Float64Array, wi: Float64Array): boolean {
	const n = h.rows;
	const a = h.data;
	const at = (i: number, j: number) => a[i * n + j];
	let anorm = 0;
	for (let i = 0; i < n; i++) for (let j = Math.max(i - 1, 0); j < n; j++) anorm += Math.abs(at(i, j));
	if (anorm === 0) {
		wr.fill(0);
		wi.fill(0);
		return true;
	}
	const eps = Number.EPSILON;
	let nn = n - 1;
	let its = 0;
	while (nn >= 0) {
		// Look for a negligible subdiagonal element to split the active window.
		let l = nn;
		for (; l > 0; l--) {
			let s = Math.abs(at(l - 1, l - 1)) + Math.abs(at(l, l));
			if (s === 0) s = anorm;
			if (Math.abs(at(l, l - 1)) <= eps * s) {
				a[l * n + l - 1] = 0;
				break;
			}
		}
		if (l === nn) {
			wr[nn] = at(nn, nn);
			wi[nn] = 0;
			nn--;
			its = 0;
			continue;
		}
		if (l === nn - 1) {
			const p = at(nn - 1, nn - 1);
			const q = at(nn - 1, nn);
			const r = at(nn, nn - 1);
			const s = at(nn, nn);
			twoByTwoEigen(p, q, r, s, wr, wi, nn - 1);
			nn -= 2;
			its = 0;
			continue;
		}
		if (its >= 120) return false;
		its++;
		// Shift polynomial λ² − ssum·λ + sprod from the trailing 2×2 block (exceptional every 10 sweeps).
		let ssum: number;
		let sprod: number;
		const hnn = at(nn, nn);
		if (its % 10 === 0) {
			const sx = Math.abs(at(nn, nn - 1)) + Math.abs(at(nn - 1, nn - 2));
			ssum = 2 * hnn + 1.5 * sx;
			sprod = hnn * hnn + 1.5 * hnn * sx + sx * sx;
		} else {
			const hmm = at(nn - 1, nn - 1);
			ssum = hmm + hnn;
			sprod = hmm * hnn - at(nn - 1, nn) * at(nn, nn - 1);
		}
		// First column of (H − μ1)(H − μ2) at the top of the window.
		const h00 = at(l, l);
		const h10 = at(l + 1, l);
		let x = h00 * h00 + at(l, l + 1) * h10 - ssum * h00 + sprod;
		let y = h10 * (h00 + at(l + 1, l + 1) - ssum);
		let z = h10 * at(l + 2, l + 1);
		for (let k = l; k <= nn - 2; k++) {
			// Householder reflector P = I − 2vvᵀ/vᵀv with v = [x + σ, y, z] zeroing y and z.
			const alpha = modulus(modulus(x, y), z);
			if (alpha !== 0) {
				const sigma = x >= 0 ? alpha : -alpha;
				const v0 = x + sigma;
				const v1 = y;
				const v2 = z;
				const beta = 2 / (v0 * v0 + v1 * v1 + v2 * v2);
				const c0 = Math.max(l, k - 1);
				for (let j = c0; j <= nn; j++) {
					const t = beta * (v0 * a[k * n + j] + v1 * a[(k + 1) * n + j] + v2 * a[(k + 2) * n + j]);
					a[k * n + j] -= t * v0;
					a[(k + 1) * n + j] -= t * v1;
					a[(k + 2) * n + j] -= t * v2;
				}
				const r1 = Math.min(k + 3, nn);
				for (let i = l; i <= r1; i++) {
					const t = beta * (v0 * a[i * n + k] + v1 * a[i * n + k + 1] + v2 * a[i * n + k + 2]);
					a[i * n + k] -= t * v0;
					a[i * n + k + 1] -= t * v1;
					a[i * n + k + 2] -= t * v2;
				}
			}
			x = a[(k + 1) * n + k];
			y = a[(k + 2) * n + k];
			z = k < nn - 2 ? a[(k + 3) * n + k] : 0;
		}
		// Final 2-element reflector on rows/columns nn−1, nn.
		const alpha = modulus(x, y);
		if (alpha !== 0) {
			const k = nn - 1;
			const sigma = x >= 0 ? alpha : -alpha;
			const v0 = x + sigma;
			const v1 = y;
			const beta = 2 / (v0 * v0 + v1 * v1);
			for (let j = Math.max(l, k - 1); j <= nn; j++) {
				const t = beta * (v0 * a[k * n + j] + v1 * a[(k + 1) * n + j]);
				a[k * n + j] -= t * v0;
				a[(k + 1) * n + j] -= t * v1;
			}
			for (let i = l; i <= nn; i++) {
				const t = beta * (v0 * a[i * n + k] + v1 * a[i * n + k + 1]);
				a[i * n + k] -= t * v0;
				a[i * n + k + 1] -= t * v1;
			}
		}
	}
	return true;
}

/** Eigenvalues of the real 2×2 block [[p, q], [r, s]] written to wr/wi at index i and i+1. */
function twoByTwoEigen(p: number, q: number, r: number, s: number, wr: Float64Array, wi: Float64Array, i: number): void {
	const half = 0.5 * (p - s);
	const disc = half * half + q * r;
	if (disc >= 0) {
		const root = Math.sqrt(disc);
		const z = half + (half >= 0 ? root : -root);
		wr[i] = s + z;
		wr[i + 1] = z !== 0 ? s - (q * r) / z : s + z;
		wi[i] = 0;
		wi[i + 1] = 0;
	} else {
		const im = Math.sqrt(-disc);
		wr[i] = s + half;
		wr[i + 1] = s + half;
		wi[i] = im;
		wi[i + 1] = -im;
	}
}
