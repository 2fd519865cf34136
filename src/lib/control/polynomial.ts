/**
 * Real polynomials as coefficient arrays in descending powers of s: [a0, a1, …, an] means
 * a0·sⁿ + a1·sⁿ⁻¹ + … + an. The zero polynomial is the empty array []. All functions are pure
 * and return new arrays.
 */
import type { Complex } from './types';
import { modulus } from './complex';

/** Degree of p after ignoring exact leading zeros; −1 for the zero polynomial. */
export function polyDegree(p: readonly number[]): number {
	let i = 0;
	while (i < p.length && p[i] === 0) i++;
	return p.length - i - 1;
}

/**
 * Removes leading coefficients that are exactly zero, or, with relTol > 0, whose magnitude is
 * at most relTol·max|aᵢ|. Returns [] for the zero polynomial.
 */
export function polyTrim(p: readonly number[], relTol = 0): number[] {
	let max = 0;
	for (const c of p) max = Math.max(max, Math.abs(c));
	const limit = relTol > 0 ? relTol * max : 0;
	let i = 0;
	while (i < p.length && Math.abs(p[i]) <= limit) i++;
	return p.slice(i);
}

/** Number of zero low-order coefficients, i.e. the multiplicity of the root s = 0 (0 for []). */
export function polyTrailingZeros(p: readonly number[]): number {
	const t = polyTrim(p);
	let k = 0;
	while (k < t.length && t[t.length - 1 - k] === 0) k++;
	return k === t.length ? 0 : k;
}

/** a + b. */
export function polyAdd(a: readonly number[], b: readonly number[]): number[] {
	const n = Math.max(a.length, b.length);
	const out = new Array<number>(n).fill(0);
	for (let i = 0; i < a.length; i++) out[n - a.length + i] += a[i];
	for (let i = 0; i < b.length; i++) out[n - b.length + i] += b[i];
	return polyTrim(out);
}

/** a − b. */
export function polySub(a: readonly number[], b: readonly number[]): number[] {
	return polyAdd(a, polyScale(b, -1));
}

/** k·p. */
export function polyScale(p: readonly number[], k: number): number[] {
	return polyTrim(p.map((c) => c * k));
}

/** a·b (convolution of the coefficient lists). */
export function polyMul(a: readonly number[], b: readonly number[]): number[] {
	if (a.length === 0 || b.length === 0) return [];
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) {
		const ai = a[i];
		if (ai === 0) continue;
		for (let j = 0; j < b.length; j++) out[i + j] += ai * b[j];
	}
	return polyTrim(out);
}

/** pᵏ for an integer k ≥ 0. */
export function polyPow(p: readonly number[], k: number): number[] {
	let out: number[] = [1];
	for (let i = 0; i < k; i++) out = polyMul(out, p);
	return out;
}

/** dp/ds. */
export function polyDerivative(p: readonly number[]): number[] {
	const t = polyTrim(p);
	const n = t.length - 1;
	if (n <= 0) return [];
	const out = new Array<number>(n);
	for (let i = 0; i < n; i++) out[i] = t[i] * (n - i);
	return out;
}

/** p(x) for real x by Horner's rule. */
export function polyEval(p: readonly number[], x: number): number {
	let acc = 0;
	for (let i = 0; i < p.length; i++) acc = acc * x + p[i];
	return acc;
}

/** p(z) for complex z = re + j·im by Horner's rule. */
export function polyEvalComplex(p: readonly number[], re: number, im: number): Complex {
	let ar = 0;
	let ai = 0;
	for (let i = 0; i < p.length; i++) {
		const nr = ar * re - ai * im + p[i];
		ai = ar * im + ai * re;
		ar = nr;
	}
	return { re: ar, im: ai };
}

/**
 * Running error bound of Horner's rule at z: Σ|aᵢ|·|z|ⁿ⁻ⁱ·(2n+1)·ε, a safe bound on
 * |computed p(z) − exact p(z)| (Higham, Accuracy and Stability of Numerical Algorithms,
 * 2nd ed., §5.1).
 */
export function polyEvalErrorBound(p: readonly number[], absZ: number): number {
	let acc = 0;
	for (let i = 0; i < p.length; i++) acc = acc * absZ + Math.abs(p[i]);
	return acc * (2 * p.length + 1) * Number.EPSILON;
}

/**
 * Monic real polynomial with the given roots. Complex roots must come in conjugate pairs
 * (the imaginary parts of the product are discarded); each pair is multiplied in as the real
 * quadratic s² − 2·Re(r)·s + |r|².
 */
export function polyFromRoots(roots: readonly Complex[]): number[] {
	let out: number[] = [1];
	const used = new Array<boolean>(roots.length).fill(false);
	for (let i = 0; i < roots.length; i++) {
		if (used[i]) continue;
		used[i] = true;
		const r = roots[i];
		if (r.im === 0) {
			out = polyMulRaw(out, [1, -r.re]);
			continue;
		}
		// Find the conjugate partner nearest to r̄.
		let best = -1;
		let bestDist = Infinity;
		for (let j = i + 1; j < roots.length; j++) {
			if (used[j]) continue;
			const d = modulus(roots[j].re - r.re, roots[j].im + r.im);
			if (d < bestDist) {
				bestDist = d;
				best = j;
			}
		}
		if (best >= 0) {
			used[best] = true;
			const re = 0.5 * (r.re + roots[best].re);
			const im = 0.5 * (Math.abs(r.im) + Math.abs(roots[best].im));
			out = polyMulRaw(out, [1, -2 * re, re * re + im * im]);
		} else {
			out = polyMulRaw(out, [1, -r.re]);
		}
	}
	return out;
}

function polyMulRaw(a: readonly number[], b: readonly number[]): number[] {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
}

/**
 * Polynomial long division a = q·b + r with deg r < deg b. Throws when b is the zero polynomial.
 */
export function polyDivide(a: readonly number[], b: readonly number[]): { quotient: number[]; remainder: number[] } {
	const bt = polyTrim(b);
	if (bt.length === 0) throw new Error('polyDivide: division by the zero polynomial');
	const r = polyTrim(a).slice();
	const nb = bt.length;
	if (r.length < nb) return { quotient: [], remainder: r };
	const q = new Array<number>(r.length - nb + 1).fill(0);
	for (let i = 0; i <= r.length - nb; i++) {
		const f = r[i] / bt[0];
		q[i] = f;
		if (f === 0) continue;
		for (let j = 0; j < nb; j++) r[i + j] -= f * bt[j];
		r[i] = 0;
	}
	return { quotient: polyTrim(q), remainder: polyTrim(r.slice(r.length - nb + 1)) };
}

/**
 * p(α·s): coefficient of sᵏ multiplied by αᵏ. Substituting s → α·s stretches every time
 * constant by α (used for time scaling and time-constant uncertainty).
 */
export function polyScaleArgument(p: readonly number[], alpha: number): number[] {
	const n = p.length - 1;
	const out = new Array<number>(p.length);
	let f = 1;
	for (let i = n; i >= 0; i--) {
		out[i] = p[i] * f;
		f *= alpha;
	}
	return out;
}

/** The largest coefficient magnitude (0 for []). */
export function polyMaxAbs(p: readonly number[]): number {
	let m = 0;
	for (const c of p) m = Math.max(m, Math.abs(c));
	return m;
}

/** True when every coefficient is a finite number. */
export function polyIsFinite(p: readonly number[]): boolean {
	for (const c of p) if (!Number.isFinite(c)) return false;
	return true;
}
