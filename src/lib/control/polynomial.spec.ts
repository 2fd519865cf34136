import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	polyAdd,
	polyDegree,
	polyDerivative,
	polyDivide,
	polyEval,
	polyEvalComplex,
	polyFromRoots,
	polyMul,
	polyPow,
	polyScale,
	polyScaleArgument,
	polySub,
	polyTrailingZeros,
	polyTrim
} from './polynomial';

// Check values are exact consequences of the definitions (expansions done by hand, common practice).
describe('polynomial arithmetic', () => {
	it('adds, subtracts and scales with different lengths', () => {
		expect(polyAdd([1, 2, 3], [4, 5])).toEqual([1, 6, 8]);
		expect(polySub([1, 2, 3], [1, 2, 3])).toEqual([]);
		expect(polySub([1, 2, 3], [1, 0, 0])).toEqual([2, 3]);
		expect(polyScale([1, -2], 3)).toEqual([3, -6]);
	});

	it('multiplies: (s+1)(s+2) = s²+3s+2 and (s+1)³ = s³+3s²+3s+1', () => {
		expect(polyMul([1, 1], [1, 2])).toEqual([1, 3, 2]);
		expect(polyPow([1, 1], 3)).toEqual([1, 3, 3, 1]);
		expect(polyMul([], [1, 2])).toEqual([]);
	});

	it('differentiates: d/ds (s³ + 2s² + 3s + 4) = 3s² + 4s + 3', () => {
		expect(polyDerivative([1, 2, 3, 4])).toEqual([3, 4, 3]);
		expect(polyDerivative([5])).toEqual([]);
	});

	it('evaluates at real and complex points: p(s) = s² + 1 vanishes at ±j', () => {
		expect(polyEval([1, 0, 1], 2)).toBe(5);
		const v = polyEvalComplex([1, 0, 1], 0, 1);
		expect(v.re).toBe(0);
		expect(v.im).toBe(0);
		const w = polyEvalComplex([1, 2, 3], 1, 1); // (1+j)² + 2(1+j) + 3 = 5 + 4j
		expect(w).toEqual({ re: 5, im: 4 });
	});

	it('trims leading zeros exactly or relative to the largest coefficient', () => {
		expect(polyTrim([0, 0, 1, 2])).toEqual([1, 2]);
		expect(polyTrim([0, 0])).toEqual([]);
		expect(polyTrim([1e-20, 1, 2], 1e-12)).toEqual([1, 2]);
		expect(polyDegree([0, 3, 0, 1])).toBe(2);
		expect(polyDegree([])).toBe(-1);
	});

	it('counts roots at the origin', () => {
		expect(polyTrailingZeros([1, 2, 0, 0])).toBe(2);
		expect(polyTrailingZeros([1, 2])).toBe(0);
		expect(polyTrailingZeros([0, 0])).toBe(0);
	});

	it('builds a polynomial from conjugate roots: roots −1 ± 2j give s² + 2s + 5', () => {
		expect(polyFromRoots([{ re: -1, im: 2 }, { re: -1, im: -2 }])).toEqual([1, 2, 5]);
		expect(polyFromRoots([{ re: -1, im: 0 }, { re: -2, im: 0 }])).toEqual([1, 3, 2]);
	});

	it('divides: (s³ + 2s² + 3s + 4) = (s + 1)(s² + s + 2) + 2', () => {
		const { quotient, remainder } = polyDivide([1, 2, 3, 4], [1, 1]);
		expect(quotient).toEqual([1, 1, 2]);
		expect(remainder).toEqual([2]);
		expect(() => polyDivide([1], [0])).toThrow();
	});

	it('scales the argument: p(2s) for p = s² + 3s + 2 is 4s² + 6s + 2', () => {
		expect(polyScaleArgument([1, 3, 2], 2)).toEqual([4, 6, 2]);
	});

	it('property: a·b evaluated equals a evaluated times b evaluated; division reconstructs', () => {
		const coef = fc.double({ min: -10, max: 10, noNaN: true });
		fc.assert(
			fc.property(fc.array(coef, { minLength: 1, maxLength: 6 }), fc.array(coef, { minLength: 2, maxLength: 5 }), fc.double({ min: -2, max: 2, noNaN: true }), (a, b, x) => {
				fc.pre(Math.abs(b[0]) > 0.1);
				const prod = polyEval(polyMul(a, b), x);
				const scale = (1 + Math.abs(polyEval(a.map(Math.abs), Math.abs(x)))) * (1 + Math.abs(polyEval(b.map(Math.abs), Math.abs(x))));
				expect(Math.abs(prod - polyEval(a, x) * polyEval(b, x))).toBeLessThan(1e-12 * scale);
				const { quotient, remainder } = polyDivide(a, b);
				const back = polyAdd(polyMul(quotient, b), remainder);
				expect(Math.abs(polyEval(back, x) - polyEval(a, x))).toBeLessThan(1e-9 * scale);
			}),
			{ numRuns: 300, seed: 7 }
		);
	});
});
