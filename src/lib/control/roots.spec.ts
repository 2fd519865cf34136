import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { quadraticRoots, roots } from './roots';
import { polyDerivative, polyEvalComplex, polyEvalErrorBound, polyFromRoots, polyMul, polyPow } from './polynomial';
import type { Complex } from './types';

const dist = (a: Complex, b: Complex) => Math.hypot(a.re - b.re, a.im - b.im);

/** Greedy matching of computed roots to expected roots; returns the largest distance. */
function maxMatchError(found: Complex[], expected: Complex[]): number {
	expect(found.length).toBe(expected.length);
	const left = expected.slice();
	let worst = 0;
	for (const z of found) {
		let best = 0;
		for (let i = 1; i < left.length; i++) if (dist(z, left[i]) < dist(z, left[best])) best = i;
		worst = Math.max(worst, dist(z, left[best]));
		left.splice(best, 1);
	}
	return worst;
}

/** Chebyshev polynomial Tₙ by the recurrence Tₙ₊₁ = 2x·Tₙ − Tₙ₋₁ (Abramowitz & Stegun 1964, eq. 22.7.4, from memory). */
function chebyshevT(n: number): number[] {
	let a = [1];
	let b = [1, 0];
	if (n === 0) return a;
	for (let k = 2; k <= n; k++) {
		const next = [...b.map((c) => 2 * c), 0];
		const shifted = [0, 0, ...a];
		a = b;
		b = next.map((c, i) => c - shifted[i]);
	}
	return b;
}

describe('roots of known factorisations', () => {
	it('finds the k-fold root of (s+1)^k to near machine precision for k = 1…20 (binomial theorem, common practice)', () => {
		for (let k = 1; k <= 20; k++) {
			const r = roots(polyPow([1, 1], k));
			expect(r).toHaveLength(k);
			for (const z of r) {
				expect(Math.abs(z.re + 1)).toBeLessThan(1e-12);
				expect(z.im).toBe(0);
			}
		}
	});

	it('finds the zeros cos((2k−1)π/(2n)) of the Chebyshev polynomials T₂…T₂₀ (Abramowitz & Stegun 1964, eq. 22.16.4, from memory)', () => {
		for (let n = 2; n <= 20; n++) {
			const expected: Complex[] = [];
			for (let k = 1; k <= n; k++) expected.push({ re: Math.cos(((2 * k - 1) * Math.PI) / (2 * n)), im: 0 });
			// Conditioning of Tₙ in the monomial basis grows like 2ⁿ; 1e-10 holds to n = 20.
			expect(maxMatchError(roots(chebyshevT(n)), expected)).toBeLessThan(1e-10);
		}
	});

	it('finds the integer roots of Wilkinson’s product (s−1)(s−2)…(s−10) to its conditioning (Wilkinson, Rounding Errors in Algebraic Processes, 1963)', () => {
		const expected = Array.from({ length: 10 }, (_, i) => ({ re: i + 1, im: 0 }));
		const p = polyFromRoots(expected);
		// The coefficients are exact integers below 2^53; root 10 has condition ~1e8·ε·|p|, so 1e-7.
		expect(maxMatchError(roots(p), expected)).toBeLessThan(1e-7);
	});

	it('returns roots of Wilkinson’s degree-20 product with a backward error at rounding level (Wilkinson 1963)', () => {
		// Coefficients above 2^53 are rounded, which moves the roots by up to ~1e-2 (Wilkinson's point);
		// the check is the residual relative to Horner's error bound (Higham 2002, §5.1).
		const p = polyFromRoots(Array.from({ length: 20 }, (_, i) => ({ re: i + 1, im: 0 })));
		const r = roots(p);
		expect(r).toHaveLength(20);
		for (const z of r) {
			const v = polyEvalComplex(p, z.re, z.im);
			expect(Math.hypot(v.re, v.im)).toBeLessThan(50 * polyEvalErrorBound(p, Math.hypot(z.re, z.im)));
		}
	});

	it('separates a triple root from a close simple root: (s+1)³(s+1.02) (exact factorisation)', () => {
		const r = roots(polyMul(polyPow([1, 1], 3), [1, 1.02]));
		expect(maxMatchError(r, [{ re: -1, im: 0 }, { re: -1, im: 0 }, { re: -1, im: 0 }, { re: -1.02, im: 0 }])).toBeLessThan(1e-9);
	});

	it('finds a triple complex pair: (s²+2s+5)³ has −1 ± 2j three times each (exact factorisation)', () => {
		const r = roots(polyPow([1, 2, 5], 3));
		const expected = [...Array(3).fill({ re: -1, im: 2 }), ...Array(3).fill({ re: -1, im: -2 })];
		expect(maxMatchError(r, expected)).toBeLessThan(1e-12);
	});

	it('returns exact roots at the origin and handles leading zeros', () => {
		const r = roots([0, 0, 1, 3, 2, 0, 0]);
		expect(r).toHaveLength(4);
		expect(r.filter((z) => z.re === 0 && z.im === 0)).toHaveLength(2);
		expect(maxMatchError(r, [{ re: 0, im: 0 }, { re: 0, im: 0 }, { re: -1, im: 0 }, { re: -2, im: 0 }])).toBeLessThan(1e-15);
	});

	it('returns no roots for constants and rejects non-finite coefficients', () => {
		expect(roots([5])).toEqual([]);
		expect(roots([])).toEqual([]);
		expect(() => roots([1, Number.NaN])).toThrow(/finite/);
	});

	it('solves quadratics without cancellation: s² + 1e8·s + 1 has roots −1e-8 and −1e8 (Higham, Accuracy and Stability, 2002, §1.8)', () => {
		const [a, b] = quadraticRoots(1, 1e8, 1);
		const small = Math.abs(a.re) < Math.abs(b.re) ? a : b;
		expect(Math.abs(small.re + 1e-8) / 1e-8).toBeLessThan(1e-15);
	});

	it('spans widely different scales: (s+1e-3)(s+1)(s+1e3)(s²+0.1s+1e4)', () => {
		const expected: Complex[] = [
			{ re: -1e-3, im: 0 },
			{ re: -1, im: 0 },
			{ re: -1e3, im: 0 },
			{ re: -0.05, im: Math.sqrt(1e4 - 0.0025) },
			{ re: -0.05, im: -Math.sqrt(1e4 - 0.0025) }
		];
		const r = roots(polyFromRoots(expected));
		for (const e of expected) {
			const nearest = Math.min(...r.map((z) => dist(z, e)));
			expect(nearest / Math.hypot(e.re, e.im)).toBeLessThan(1e-12);
		}
	});
});

describe('roots: properties', () => {
	// Real parts 0 or of magnitude 0.01…50 (subnormal coefficients are outside the claim).
	const reArb = fc.oneof(fc.constant(0), fc.double({ min: 0.01, max: 50, noNaN: true }), fc.double({ min: -50, max: -0.01, noNaN: true }));
	const rootArb = fc.oneof(
		fc.record({ re: reArb, im: fc.constant(0) }),
		fc.record({ re: reArb, im: fc.double({ min: 0.01, max: 50, noNaN: true }) })
	);

	it('recovers well-separated random roots of degree ≤ 20 and keeps the residual at rounding level', () => {
		fc.assert(
			fc.property(fc.array(rootArb, { minLength: 1, maxLength: 10 }), (raw) => {
				const all: Complex[] = [];
				for (const z of raw) {
					all.push(z);
					if (z.im !== 0) all.push({ re: z.re, im: -z.im });
				}
				const p = polyFromRoots(all);
				const r = roots(p);
				expect(r).toHaveLength(all.length);
				for (const z of r) {
					const v = polyEvalComplex(p, z.re, z.im);
					expect(Math.hypot(v.re, v.im)).toBeLessThanOrEqual(100 * polyEvalErrorBound(p, Math.hypot(z.re, z.im)));
				}
				// Forward error within the first-order perturbation bound |δp(e)|/|p′(e)| (Wilkinson 1963),
				// for roots that are simple (distinct from all others by at least 0.05).
				const dp = polyDerivative(p);
				for (const e of all) {
					if (all.some((o) => o !== e && dist(o, e) < 0.05)) continue;
					const d = polyEvalComplex(dp, e.re, e.im);
					const bound = polyEvalErrorBound(p, Math.hypot(e.re, e.im)) / Math.hypot(d.re, d.im);
					const nearest = Math.min(...r.map((z) => dist(z, e)));
					expect(nearest).toBeLessThanOrEqual(1000 * bound + 1e-13 * Math.hypot(e.re, e.im));
				}
				// Conjugate symmetry is exact.
				const upper = r.filter((z) => z.im > 0).length;
				const lower = r.filter((z) => z.im < 0).length;
				expect(upper).toBe(lower);
			}),
			{ numRuns: 300, seed: 20240611 }
		);
	});
});
