import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analyzeClosedLoop, closedLoopPolynomials, dominantPair, errorConstants, routhHurwitz, steadyStateErrors } from './closed-loop';
import { controllerTerms } from './controller';
import { roots } from './roots';
import { polyEvalComplex, polyEvalErrorBound } from './polynomial';
import { AnalysisInputError } from './errors';

describe('Routh–Hurwitz', () => {
	it('s⁴ + 2s³ + 3s² + 4s + 5: first column 1, 2, 1, −6, 5 and two RHP roots (Ogata, Modern Control Engineering, Routh example, from memory; checked by the roots)', () => {
		const r = routhHurwitz([1, 2, 3, 4, 5]);
		expect(r.firstColumn.map((v) => +v.toFixed(12))).toEqual([1, 2, 1, -6, 5]);
		expect(r.rhpCount).toBe(2);
		expect(roots([1, 2, 3, 4, 5]).filter((z) => z.re > 0)).toHaveLength(2);
	});

	it('s³ + 2s² + s + 2 = (s + 2)(s² + 1): a vanishing row, no RHP root (auxiliary polynomial case, Ogata, from memory)', () => {
		const r = routhHurwitz([1, 2, 1, 2]);
		expect(r.zeroRow).toBe(true);
		expect(r.rhpCount).toBe(0);
	});

	it('s⁵ + 2s⁴ + 2s³ + 4s² + 11s + 10: zero first element (ε method), two RHP roots (Nise, Control Systems Engineering, ch. 6, from memory; checked by the roots)', () => {
		const r = routhHurwitz([1, 2, 2, 4, 11, 10]);
		expect(r.rhpCount).toBe(2);
		expect(roots([1, 2, 2, 4, 11, 10]).filter((z) => z.re > 0)).toHaveLength(2);
	});

	it('property: the sign-change count equals the number of RHP roots for random polynomials with roots off the axis', () => {
		const root = fc.record({
			re: fc.oneof(fc.double({ min: 0.05, max: 5, noNaN: true }), fc.double({ min: -5, max: -0.05, noNaN: true })),
			im: fc.oneof(fc.constant(0), fc.double({ min: 0.1, max: 5, noNaN: true }))
		});
		fc.assert(
			fc.property(fc.array(root, { minLength: 1, maxLength: 5 }), (rs) => {
				let p = [1];
				let rhp = 0;
				for (const r of rs) {
					const f = r.im === 0 ? [1, -r.re] : [1, -2 * r.re, r.re * r.re + r.im * r.im];
					const out = new Array(p.length + f.length - 1).fill(0);
					p.forEach((a, i) => f.forEach((b, j) => (out[i + j] += a * b)));
					p = out;
					if (r.re > 0) rhp += r.im === 0 ? 1 : 2;
				}
				expect(routhHurwitz(p).rhpCount).toBe(rhp);
			}),
			{ numRuns: 300, seed: 11 }
		);
	});
});

describe('closed loop', () => {
	it('P control of 4/(s(s+2)) gives s² + 2s + 4k and ζ = 1/(2√k), ωn = 2√k (standard second order, Ogata §5-3)', () => {
		const cl = analyzeClosedLoop({ num: [4], den: [1, 2, 0], delay: 0 }, controllerTerms({ type: 'P', kp: 1 }));
		expect(cl.den).toEqual([1, 2, 4]);
		expect(cl.num).toEqual([4]);
		expect(cl.stable).toBe(true);
		expect(cl.dominant?.zeta).toBeCloseTo(0.5, 14);
		expect(cl.dominant?.wn).toBeCloseTo(2, 14);
		expect(cl.dominant?.wd).toBeCloseTo(Math.sqrt(3), 14);
		expect(cl.approximation).toBe('exact');
		expect(cl.routh.agrees).toBe(true);
	});

	it('Ogata’s ZN example loses stability at Ku = 30 for 1/(s(s+1)(s+5)) (Ogata, Modern Control Engineering, ZN second method, from memory; W7)', () => {
		const plant = { num: [1], den: [1, 6, 5, 0], delay: 0 };
		expect(analyzeClosedLoop(plant, controllerTerms({ type: 'P', kp: 29.9 })).stable).toBe(true);
		const at = analyzeClosedLoop(plant, controllerTerms({ type: 'P', kp: 30 }));
		expect(at.stable).toBe(false);
		expect(at.instability).toMatch(/imaginary axis|right half-plane/);
		expect(analyzeClosedLoop(plant, controllerTerms({ type: 'P', kp: 31 })).poleCounts.rhp).toBe(2);
	});

	it('uses a Padé approximation for delayed loops and says so', () => {
		const cl = analyzeClosedLoop({ num: [1.2], den: [4, 1], delay: 0.8 }, controllerTerms({ type: 'PI', kp: 2.0833333333333335, ti: 4 }), 5);
		expect(cl.approximation).toBe('pade');
		expect(cl.padeOrder).toBe(5);
		expect(cl.poles).toHaveLength(7);
		expect(cl.warnings.join(' ')).toMatch(/Padé/);
	});

	it('flags a neutral loop (|L(∞)| ≥ 1 with dead time) as unstable', () => {
		// Ideal PD on a first-order plant: L(∞) = kp·td·K/τ = 2.
		const cl = analyzeClosedLoop({ num: [1], den: [1, 1], delay: 0.1 }, controllerTerms({ type: 'PD', kp: 2, td: 1 }));
		expect(cl.stable).toBe(false);
		expect(cl.instability).toMatch(/neutral/);
	});

	it('rejects improper and ill-posed loops with the field', () => {
		const err = (f: () => unknown) => {
			try {
				f();
			} catch (e) {
				return e as AnalysisInputError;
			}
			return null;
		};
		expect(err(() => analyzeClosedLoop({ num: [1, 1], den: [1, 2], delay: 0 }, controllerTerms({ type: 'PD', kp: 1, td: 1 })))?.field).toBe('controller.n');
		// 1 + C(∞)G(∞) = 0: P gain −1 on a plant with unit feedthrough.
		expect(err(() => analyzeClosedLoop({ num: [1, 1], den: [1, 2], delay: 0 }, controllerTerms({ type: 'P', kp: -1 })))?.field).toBe('controller.kp');
	});

	it('property: the closed-loop poles are the roots of dc·dg + nc·ng (residual at rounding level)', () => {
		fc.assert(
			fc.property(
				fc.array(fc.double({ min: 0.1, max: 10, noNaN: true }), { minLength: 1, maxLength: 5 }),
				fc.double({ min: 0.1, max: 20, noNaN: true }),
				fc.double({ min: 0.2, max: 20, noNaN: true }),
				fc.oneof(fc.constant(0), fc.double({ min: 0.01, max: 5, noNaN: true })),
				(taus, kp, ti, td) => {
					let den = [1];
					for (const t of taus) den = mul(den, [t, 1]);
					const plant = { num: [1], den, delay: 0 };
					const terms = controllerTerms({ type: 'PID', kp, ti, td, n: 10 });
					const cl = analyzeClosedLoop(plant, terms);
					const char = closedLoopPolynomials(plant, terms).char;
					expect(cl.poles).toHaveLength(char.length - 1);
					for (const p of cl.poles) {
						const v = polyEvalComplex(char, p.re, p.im);
						expect(Math.hypot(v.re, v.im)).toBeLessThanOrEqual(1e3 * polyEvalErrorBound(char, Math.hypot(p.re, p.im)));
					}
				}
			),
			{ numRuns: 200, seed: 5 }
		);
	});
});

function mul(a: number[], b: number[]) {
	const out = new Array(a.length + b.length - 1).fill(0);
	a.forEach((x, i) => b.forEach((y, j) => (out[i + j] += x * y)));
	return out;
}

describe('error constants and steady-state errors (final value theorem, Ogata §5-8)', () => {
	it('type 0: Kp = L(0), e_step = 1/(1 + Kp)', () => {
		const ec = errorConstants([2], [1, 3, 2]);
		expect(ec).toEqual({ systemType: 0, kp: 1, kv: 0, ka: 0 });
		// Closed loop of L = 2/((s+1)(s+2)): char s² + 3s + 4, ry = 2 → e = 1 − 2/4 = 1/(1 + Kp) = 0.5.
		expect(steadyStateErrors([1, 3, 4], [2])).toEqual({ step: 0.5, ramp: null, parabola: null });
	});

	it('type 1: Kv = lim s·L, e_ramp = 1/Kv', () => {
		const ec = errorConstants([4], [1, 2, 0]);
		expect(ec.systemType).toBe(1);
		expect(ec.kp).toBeNull();
		expect(ec.kv).toBe(2);
		const ss = steadyStateErrors([1, 2, 4], [4]);
		expect(ss.step).toBe(0);
		expect(ss.ramp).toBeCloseTo(0.5, 15);
		expect(ss.parabola).toBeNull();
	});

	it('type 2: Ka = lim s²·L, zero ramp error', () => {
		const ec = errorConstants([3, 1], [1, 1, 0, 0]);
		expect(ec).toEqual({ systemType: 2, kp: null, kv: null, ka: 1 });
	});

	it('the rightmost pole decides dominance: real → null', () => {
		expect(dominantPair([{ re: -0.5, im: 0 }, { re: -1, im: 2 }, { re: -1, im: -2 }])).toBeNull();
		const d = dominantPair([{ re: -5, im: 0 }, { re: -1, im: 2 }, { re: -1, im: -2 }]);
		expect(d?.wn).toBeCloseTo(Math.sqrt(5), 15);
		expect(d?.zeta).toBeCloseTo(1 / Math.sqrt(5), 15);
	});
});

describe('root magnitude bound', () => {
	it('bounds every root (Fujiwara 1916, from memory): property on random polynomials', async () => {
		const { rootMagnitudeBound } = await import('./closed-loop');
		fc.assert(
			fc.property(fc.array(fc.oneof(fc.constant(0), fc.double({ min: 1e-3, max: 100, noNaN: true }), fc.double({ min: -100, max: -1e-3, noNaN: true })), { minLength: 2, maxLength: 12 }), (p) => {
				fc.pre(p[0] !== 0);
				const bound = rootMagnitudeBound(p);
				for (const r of roots(p)) expect(Math.hypot(r.re, r.im)).toBeLessThanOrEqual(bound * (1 + 1e-9) + 1e-12);
			}),
			{ numRuns: 300, seed: 41 }
		);
	});
});
