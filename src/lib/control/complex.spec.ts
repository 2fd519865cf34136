import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { modulus } from './complex';

// Reference: Math.hypot, the ECMAScript built-in (ECMA-262 §21.3.2.18), which avoids overflow and underflow.
describe('modulus', () => {
	it('agrees with Math.hypot to 4 ulp over the whole double range, including extreme exponents', () => {
		const anyDouble = fc.double({ noNaN: true, noDefaultInfinity: true });
		fc.assert(
			fc.property(anyDouble, anyDouble, (a, b) => {
				const ref = Math.hypot(a, b);
				const got = modulus(a, b);
				if (ref === 0 || !Number.isFinite(ref)) expect(got).toBe(ref);
				else expect(Math.abs(got - ref)).toBeLessThanOrEqual(4 * Number.EPSILON * ref);
			}),
			{ seed: 1201, numRuns: 20000 }
		);
	});
	it('does not overflow or underflow where the squares would: (3e200, 4e200) → 5e200, (3e-200, 4e-200) → 5e-200', () => {
		expect(modulus(3e200, 4e200) / 5e200).toBeCloseTo(1, 14);
		expect(modulus(3e-200, -4e-200) / 5e-200).toBeCloseTo(1, 14);
	});
	it('follows Math.hypot for infinities and NaN', () => {
		expect(modulus(Infinity, NaN)).toBe(Infinity);
		expect(modulus(-Infinity, 1)).toBe(Infinity);
		expect(modulus(NaN, 1)).toBeNaN();
		expect(modulus(0, -0)).toBe(0);
	});
});
