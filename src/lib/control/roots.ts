/**
 * Roots of real polynomials up to (at least) degree 40: eigenvalues of the balanced companion
 * matrix by Hessenberg QR, Newton polishing on the polynomial, and recovery of numerically
 * multiple roots from clusters.
 */
import type { Complex } from './types';
import { balance, hessenbergEigenvalues } from './linalg';
import { SLOT, scratch } from './workspace';
import { polyDerivative, polyTrim } from './polynomial';
import { modulus } from './complex';

/**
 * All complex roots of the real polynomial p (descending coefficients; exact leading zeros are
 * ignored), with multiplicity, sorted by decreasing real part then decreasing imaginary part.
 * Complex roots come in exact conjugate pairs; roots at s = 0 are exact.
 *
 * Method: companion-matrix eigenvalues with Parlett–Reinsch balancing and the Francis
 * double-shift QR iteration (as numpy.roots / LAPACK dhseqr; Golub & Van Loan, Matrix
 * Computations, 4th ed., §7.5), then Newton polishing on p, then clusters that form a
 * numerically multiple root (p, p′, …, p^(m−1) all vanish to rounding level at one point, the
 * "numerical multiplicity" idea of Zeng, Math. Comp. 74 (2005) 869–903) are replaced by that
 * m-fold root, found by Newton's method on p^(m−1).
 * Coefficients below 1e-250 of the largest count as zero. Throws when a coefficient is not
 * finite (or, in theory, when the iteration fails; the result never holds NaN or Infinity).
 */
export function roots(p: readonly number[]): Complex[] {
	for (const c of p) if (!Number.isFinite(c)) throw new Error('roots: coefficients must be finite numbers');
	// Coefficients below 1e-250 of the largest are rounding dust (a backward error far below ε);
	// treating them as zero keeps the companion matrix inside the floating-point range.
	let max = 0;
	for (const c of p) max = Math.max(max, Math.abs(c));
	const t = polyTrim(p.map((c) => (Math.abs(c) < 1e-250 * max ? 0 : c)));
	if (t.length <= 1) return [];
	// Exact roots at the origin.
	let end = t.length;
	let zeroRoots = 0;
	while (end > 1 && t[end - 1] === 0) {
		end--;
		zeroRoots++;
	}
	const q = t.slice(0, end);
	const found = rootsNonZero(q);
	for (const z of found) if (!Number.isFinite(z.re) || !Number.isFinite(z.im)) throw new Error('roots: the polynomial is outside the floating-point range');
	for (let i = 0; i < zeroRoots; i++) found.push({ re: 0, im: 0 });
	return sortRoots(found);
}

/** Sorts roots by decreasing real part, then decreasing imaginary part. */
export function sortRoots(r: Complex[]): Complex[] {
	return r.sort((a, b) => (b.re !== a.re ? b.re - a.re : b.im - a.im));
}

function rootsNonZero(q: number[]): Complex[] {
	const n = q.length - 1;
	if (n === 0) return [];
	if (n === 1) return [{ re: -q[1] / q[0], im: 0 }];
	if (n === 2) return quadraticRoots(q[0], q[1], q[2]);
	let r = companionEigenvalues(q);
	r = r.map((z) => polish(q, z, r));
	r = recoverMultipleRoots(q, r);
	return conjugateSymmetric(r);
}

/** Roots of a·s² + b·s + c (a ≠ 0) without cancellation (Higham 2002, §1.8). */
export function quadraticRoots(a: number, b: number, c: number): Complex[] {
	// Scale to avoid overflow in b² − 4ac.
	const s = Math.max(Math.abs(a), Math.abs(b), Math.abs(c));
	const A = a / s;
	const B = b / s;
	const C = c / s;
	const disc = B * B - 4 * A * C;
	if (disc >= 0) {
		const root = Math.sqrt(disc);
		const qq = -0.5 * (B + (B >= 0 ? root : -root));
		if (qq === 0) return [
			{ re: 0, im: 0 },
			{ re: 0, im: 0 }
		];
		return [
			{ re: qq / A, im: 0 },
			{ re: C / qq, im: 0 }
		];
	}
	const re = -B / (2 * A);
	const im = Math.sqrt(-disc) / (2 * Math.abs(A));
	return [
		{ re, im },
		{ re, im: -im }
	];
}

function companionEigenvalues(q: number[]): Complex[] {
	const n = q.length - 1;
	const data = scratch(SLOT.companion, n * n);
	data.fill(0);
	const h = { rows: n, cols: n, data };
	const a0 = q[0];
	for (let j = 0; j < n; j++) h.data[j] = -q[j + 1] / a0;
	for (let i = 1; i < n; i++) h.data[i * n + i - 1] = 1;
	balance(h);
	const wr = scratch(SLOT.companionRe, n);
	const wi = scratch(SLOT.companionIm, n);
	if (!hessenbergEigenvalues(h, wr, wi)) throw new Error('roots: QR iteration did not converge');
	const out: Complex[] = [];
	for (let i = 0; i < n; i++) out.push({ re: wr[i], im: wi[i] });
	return out;
}

/** p(z) and p′(z) by Horner's rule, plus the rounding-error bound of p(z). */
function hornerWithDerivative(p: readonly number[], zr: number, zi: number) {
	let pr = p[0];
	let pi = 0;
	let dr = 0;
	let di = 0;
	const az = modulus(zr, zi);
	let bound = Math.abs(p[0]);
	for (let k = 1; k < p.length; k++) {
		const ndr = dr * zr - di * zi + pr;
		di = dr * zi + di * zr + pi;
		dr = ndr;
		const npr = pr * zr - pi * zi + p[k];
		pi = pr * zi + pi * zr;
		pr = npr;
		bound = bound * az + Math.abs(p[k]);
	}
	return { pr, pi, dr, di, bound: bound * (2 * p.length + 1) * Number.EPSILON };
}

/** Newton polishing of one root; each step is kept only if it lowers |p| and stays local. */
function polish(p: readonly number[], z: Complex, all: readonly Complex[]): Complex {
	let nearest = Infinity;
	for (const w of all) {
		if (w === z) continue;
		const d = modulus(w.re - z.re, w.im - z.im);
		if (d < nearest) nearest = d;
	}
	let zr = z.re;
	let zi = z.im;
	let h = hornerWithDerivative(p, zr, zi);
	let res = modulus(h.pr, h.pi);
	for (let it = 0; it < 6; it++) {
		if (res <= h.bound) break;
		const den = h.dr * h.dr + h.di * h.di;
		if (den === 0) break;
		const sr = (h.pr * h.dr + h.pi * h.di) / den;
		const si = (h.pi * h.dr - h.pr * h.di) / den;
		if (modulus(sr, si) > 0.3 * nearest) break;
		const nr = zr - sr;
		const ni = z.im === 0 ? 0 : zi - si;
		const hn = hornerWithDerivative(p, nr, ni);
		const resn = modulus(hn.pr, hn.pi);
		if (!(resn < res)) break;
		zr = nr;
		zi = ni;
		h = hn;
		res = resn;
	}
	return { re: zr, im: zi };
}

const CLUSTER_THRESHOLDS = [0.2, 0.1, 0.03, 0.01, 3e-3, 1e-3, 3e-4, 1e-4, 1e-5, 1e-6, 1e-7];

/**
 * Replaces clusters of computed roots by a multiple root where the polynomial and its first
 * m−1 derivatives vanish to rounding level at one point (see `roots`).
 */
function recoverMultipleRoots(p: readonly number[], r: Complex[]): Complex[] {
	const n = r.length;
	const final = new Array<boolean>(n).fill(false);
	const out = r.slice();
	// Derivatives p, p′, p″, … computed on first use.
	const derivList: number[][] = [p.slice()];
	const deriv = (k: number): number[] => {
		while (derivList.length <= k) derivList.push(polyDerivative(derivList[derivList.length - 1]));
		return derivList[k];
	};
	for (const rel of CLUSTER_THRESHOLDS) {
		// Single-linkage groups among roots not yet finalised.
		const group = new Array<number>(n).fill(-1);
		let groups = 0;
		for (let i = 0; i < n; i++) {
			if (final[i] || group[i] >= 0) continue;
			group[i] = groups;
			const stack = [i];
			while (stack.length) {
				const a = stack.pop() as number;
				for (let j = 0; j < n; j++) {
					if (final[j] || group[j] >= 0) continue;
					const scale = Math.max(modulus(out[a].re, out[a].im), modulus(out[j].re, out[j].im));
					if (modulus(out[a].re - out[j].re, out[a].im - out[j].im) <= rel * scale) {
						group[j] = groups;
						stack.push(j);
					}
				}
			}
			groups++;
		}
		let any = false;
		for (let g = 0; g < groups; g++) {
			const members: number[] = [];
			for (let i = 0; i < n; i++) if (group[i] === g) members.push(i);
			if (members.length < 2) continue;
			any = true;
			const m = members.length;
			let cr = 0;
			let ci = 0;
			for (const i of members) {
				cr += out[i].re;
				ci += out[i].im;
			}
			cr /= m;
			ci /= m;
			// The cluster may have missed a few of its members: try multiplicities m+3 … m and keep
			// the largest one that the derivatives confirm.
			let accepted: { c: Complex; mult: number } | null = null;
			for (let mult = Math.min(n, m + 3); mult >= m && !accepted; mult--) {
				const c = newtonOnDerivative(deriv(mult - 1), cr, ci);
				if (c && vanishesTo(deriv, mult, c, p.length)) accepted = { c, mult };
			}
			if (!accepted) continue;
			const { c, mult } = accepted;
			// Replace the `mult` unfinalised roots nearest to c.
			const order = out
				.map((z, i) => ({ i, d: modulus(z.re - c.re, z.im - c.im) }))
				.filter((e) => !final[e.i])
				.sort((x, y) => x.d - y.d)
				.slice(0, mult);
			for (const { i } of order) {
				out[i] = { re: c.re, im: c.im };
				final[i] = true;
			}
		}
		if (!any) break;
	}
	return out;
}

/** True when p, p′, …, p^(m−1) all vanish at c to within 8·(n+1)·ε times their Horner magnitude. */
function vanishesTo(deriv: (k: number) => number[], m: number, c: Complex, len: number): boolean {
	for (let k = 0; k < m; k++) {
		const d = deriv(k);
		let mag = 0;
		const az = modulus(c.re, c.im);
		for (let i = 0; i < d.length; i++) mag = mag * az + Math.abs(d[i]);
		const h = hornerWithDerivative(d, c.re, c.im);
		if (modulus(h.pr, h.pi) > 8 * (len + 1) * Number.EPSILON * mag) return false;
	}
	return true;
}

function newtonOnDerivative(d: readonly number[], zr: number, zi: number): Complex | null {
	let res = Infinity;
	for (let it = 0; it < 40; it++) {
		const h = hornerWithDerivative(d, zr, zi);
		const r = modulus(h.pr, h.pi);
		if (r <= h.bound || r === 0) return { re: zr, im: zi };
		const den = h.dr * h.dr + h.di * h.di;
		if (den === 0) return null;
		const sr = (h.pr * h.dr + h.pi * h.di) / den;
		const si = (h.pi * h.dr - h.pr * h.di) / den;
		zr -= sr;
		zi -= si;
		if (modulus(sr, si) <= 4 * Number.EPSILON * modulus(zr, zi)) return { re: zr, im: zi };
		if (it > 10 && r >= res) return { re: zr, im: zi };
		res = r;
	}
	return { re: zr, im: zi };
}

/** Pairs complex roots with their conjugates (averaging the pair) and makes lone roots real. */
function conjugateSymmetric(r: Complex[]): Complex[] {
	const n = r.length;
	const used = new Array<boolean>(n).fill(false);
	const out: Complex[] = [];
	// Roots whose imaginary part is rounding noise become real.
	const clean = r.map((z) => {
		const tiny = 16 * Number.EPSILON * modulus(z.re, z.im);
		return Math.abs(z.im) <= tiny ? { re: z.re, im: 0 } : z;
	});
	for (let i = 0; i < n; i++) {
		if (used[i]) continue;
		used[i] = true;
		const z = clean[i];
		if (z.im === 0) {
			out.push(z);
			continue;
		}
		let best = -1;
		let bestDist = Infinity;
		for (let j = 0; j < n; j++) {
			if (used[j] || Math.sign(clean[j].im) === Math.sign(z.im) || clean[j].im === 0) continue;
			const d = modulus(clean[j].re - z.re, clean[j].im + z.im);
			if (d < bestDist) {
				bestDist = d;
				best = j;
			}
		}
		if (best < 0) {
			out.push({ re: z.re, im: 0 });
			continue;
		}
		used[best] = true;
		const re = 0.5 * (z.re + clean[best].re);
		const im = 0.5 * (Math.abs(z.im) + Math.abs(clean[best].im));
		out.push({ re, im }, { re, im: -im });
	}
	return out;
}
