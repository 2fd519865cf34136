import { describe, expect, it } from 'vitest';
import {
	makeTransferFunction,
	pade,
	padeCoefficients,
	tfDcGain,
	tfEval,
	tfFeedback,
	tfMinreal,
	tfPade,
	tfParallel,
	tfRelativeDegree,
	tfScaleTime,
	tfSeries,
	tfSystemType
} from './transfer-function';
import { AnalysisInputError } from './errors';

describe('transfer functions', () => {
	it('validates and trims: leading zeros removed, zero denominator and negative delay rejected with the field', () => {
		expect(makeTransferFunction([0, 1], [0, 1, 2], 0.5)).toEqual({ num: [1], den: [1, 2], delay: 0.5 });
		const fieldOf = (f: () => unknown) => {
			try {
				f();
			} catch (e) {
				return (e as AnalysisInputError).field;
			}
			return null;
		};
		expect(fieldOf(() => makeTransferFunction([1], [0, 0]))).toBe('plant.den');
		expect(fieldOf(() => makeTransferFunction([1], [1, 1], -1))).toBe('plant.delay');
		expect(fieldOf(() => makeTransferFunction([Number.NaN], [1, 1]))).toBe('plant.num');
		expect(fieldOf(() => makeTransferFunction([1], [1, Infinity]))).toBe('plant.den');
	});

	it('connects in series (delays add), in parallel and in negative feedback', () => {
		const g = { num: [1], den: [1, 1], delay: 0.2 };
		const h = { num: [2], den: [1, 3], delay: 0.3 };
		expect(tfSeries(g, h)).toEqual({ num: [2], den: [1, 4, 3], delay: 0.5 });
		// 1/(s+1) + 2/(s+3) = (3s + 5)/((s+1)(s+3))
		expect(tfParallel({ ...g, delay: 0 }, { ...h, delay: 0 })).toEqual({ num: [3, 5], den: [1, 4, 3], delay: 0 });
		// Unity feedback of 4/(s(s+2)) is 4/(s² + 2s + 4) (standard second order, Ogata §5-3).
		expect(tfFeedback({ num: [4], den: [1, 2, 0], delay: 0 })).toEqual({ num: [4], den: [1, 2, 4], delay: 0 });
		expect(() => tfFeedback(g)).toThrow(/Padé|tfPade/);
	});

	it('DC gain, system type and relative degree', () => {
		expect(tfDcGain({ num: [2, 4], den: [1, 3, 8], delay: 1 }).value).toBe(0.5);
		expect(tfDcGain({ num: [1], den: [1, 1, 0], delay: 0 }).value).toBeNull();
		expect(tfDcGain({ num: [1, 0], den: [1, 1], delay: 0 }).value).toBe(0);
		expect(tfSystemType({ num: [1], den: [1, 1, 0, 0], delay: 0 })).toBe(2);
		expect(tfSystemType({ num: [1, 0], den: [1, 1], delay: 0 })).toBe(-1);
		expect(tfRelativeDegree({ num: [1, 2], den: [1, 3, 3, 1], delay: 0 })).toBe(2);
	});

	it('evaluates with the exact delay: e^(−jωθ) has unit magnitude and phase −ωθ', () => {
		const v = tfEval({ num: [1], den: [1], delay: 0.5 }, 0, 2);
		expect(Math.hypot(v.re, v.im)).toBeCloseTo(1, 15);
		expect(Math.atan2(v.im, v.re)).toBeCloseTo(-1, 15);
		// 1/(s+1) at s = j: (1 − j)/2.
		const w = tfEval({ num: [1], den: [1, 1], delay: 0 }, 0, 1);
		expect(w.re).toBeCloseTo(0.5, 15);
		expect(w.im).toBeCloseTo(-0.5, 15);
	});

	it('cancels common roots within a tolerance and keeps the rest', () => {
		// (s+1)(s+2) / ((s+1)(s+3)(s+4)) → (s+2)/((s+3)(s+4))
		const g = tfMinreal({ num: [1, 3, 2], den: [1, 8, 19, 12], delay: 0.1 });
		expect(g.num.map((c) => +c.toFixed(12))).toEqual([1, 2]);
		expect(g.den.map((c) => +c.toFixed(12))).toEqual([1, 7, 12]);
		expect(g.delay).toBe(0.1);
		// A near-cancellation outside the tolerance stays.
		const h = tfMinreal({ num: [1, 1.001], den: [1, 2, 1], delay: 0 }, 1e-8);
		expect(h.den).toHaveLength(3);
	});

	it('stretches time: G(αs) with delay α·θ', () => {
		expect(tfScaleTime({ num: [1], den: [1, 1], delay: 2 }, 3)).toEqual({ num: [1], den: [3, 1], delay: 6 });
	});
});

describe('Padé approximation of the dead time', () => {
	it('has the standard coefficients: [1/1] = (1 − θs/2)/(1 + θs/2), [2/2] with θ²s²/12 (Franklin, Powell & Emami-Naeini, Feedback Control of Dynamic Systems, §5.6, from memory)', () => {
		expect(padeCoefficients(1)).toEqual([1, 0.5]);
		expect(padeCoefficients(2)).toEqual([1, 0.5, 1 / 12]);
		// [3/3]: 1, 1/2, 1/10, 1/120 (same source).
		const c3 = padeCoefficients(3);
		[1, 1 / 2, 1 / 10, 1 / 120].forEach((v, i) => expect(c3[i]).toBeCloseTo(v, 15));
		const p = pade(2, 2);
		expect(p.num).toEqual([(4 * 1) / 12, -1, 1]);
		expect(p.den).toEqual([4 / 12, 1, 1]);
	});

	it('matches e^(−jωθ) closely at low frequency and has unit magnitude on the imaginary axis (all-pass)', () => {
		const theta = 0.7;
		for (const order of [1, 3, 5, 8]) {
			const g = tfPade({ num: [1], den: [1], delay: theta }, order);
			for (const w of [0.01, 0.3, 1, 3]) {
				const v = tfEval(g, 0, w);
				expect(Math.hypot(v.re, v.im)).toBeCloseTo(1, 12);
			}
			const v = tfEval(g, 0, 0.5);
			const err = Math.hypot(v.re - Math.cos(-0.5 * theta), v.im - Math.sin(-0.5 * theta));
			expect(err).toBeLessThan(order >= 3 ? 1e-6 : 1e-2);
		}
	});
});
