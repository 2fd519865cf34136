import { describe, expect, it } from 'vitest';
import { ReductionError, halfRule, reduceRational } from './reduction';
import reference from './fixtures/tuning-reference.json';

const R = reference.reduction;

describe('half rule (Skogestad 2003, J. Process Control 13, 291–309, section 3)', () => {
	it('W1/W2: example E2 with an LHP zero, an RHP zero and seven lags', () => {
		// Skogestad 2003, example E2 (reduced models from memory, not verified against the paper;
		// reproduced [C] in fixture reduction.e2 from numpy.roots of the expanded polynomials):
		// zero 0.08 cancelled against lag 0.2 → 0.12; FOPDT k = 1, τ = 2.5, θ = 1.47;
		// SOPDT τ1 = 2, τ2 = 1.2, θ = 0.77.
		const res = halfRule({
			gain: 1,
			lags: [2, 1, 0.4, 0.2, 0.05, 0.05, 0.05],
			leads: [0.08],
			rhpZeros: [0.3]
		});
		expect(res.fopdt.k).toBe(1);
		expect(res.fopdt.tau).toBeCloseTo(2.5, 12);
		expect(res.fopdt.theta).toBeCloseTo(1.47, 12);
		expect(res.fopdt.theta).toBeCloseTo(R.e2.fopdt.theta, 9);
		expect(res.sopdt).not.toBeNull();
		expect(res.sopdt!.tau1).toBeCloseTo(2, 12);
		expect(res.sopdt!.tau2).toBeCloseTo(1.2, 12);
		expect(res.sopdt!.theta).toBeCloseTo(0.77, 12);
		expect(res.sopdt!.theta).toBeCloseTo(R.e2.sopdt.theta, 9);
		expect(res.notes.join(' ')).toMatch(/LHP zero 0\.08 s cancelled against lag 0\.2 s, leaving a lag of 0\.12 s/);
	});

	it('W3: 1/((s+1)(0.2s+1)) → τ = 1.1, θ = 0.1', () => {
		// Skogestad 2003, first model-reduction example (from memory); fixture reduction.w3 [C].
		const res = halfRule({ gain: 1, lags: [0.2, 1] });
		expect(res.fopdt.tau).toBeCloseTo(R.w3.fopdt.tau, 12);
		expect(res.fopdt.theta).toBeCloseTo(R.w3.fopdt.theta, 12);
		expect(res.fopdt.tau).toBeCloseTo(1.1, 12);
		expect(res.fopdt.theta).toBeCloseTo(0.1, 12);
		// SOPDT keeps both lags exactly.
		expect(res.sopdt).toEqual({ k: 1, tau1: 1, tau2: 0.2, theta: 0 });
	});

	it('W4: four lags → FOPDT (1.1, 0.148), SOPDT (1, 0.22, 0.028)', () => {
		// Skogestad 2003 (from memory); fixture reduction.w4 [C].
		const res = halfRule({ gain: 1, lags: [1, 0.2, 0.04, 0.008] });
		expect(res.fopdt.tau).toBeCloseTo(1.1, 12);
		expect(res.fopdt.theta).toBeCloseTo(0.148, 12);
		expect(res.sopdt!.tau1).toBe(1);
		expect(res.sopdt!.tau2).toBeCloseTo(0.22, 12);
		expect(res.sopdt!.theta).toBeCloseTo(0.028, 12);
		expect(res.sopdt!.theta).toBeCloseTo(R.w4.sopdt.theta, 12);
	});

	it('W15(b): five lags → FOPDT (1.9, 1.5), SOPDT (1.5, 1.1, 0.8)', () => {
		// Reference sheet W15(b), half-rule row [C]; fixture reduction.w15.
		const res = halfRule({ gain: 1, lags: [1.5, 0.8, 0.6, 0.3, 0.2] });
		expect(res.fopdt.tau).toBeCloseTo(R.w15.fopdt.tau, 12);
		expect(res.fopdt.theta).toBeCloseTo(R.w15.fopdt.theta, 12);
		expect(res.sopdt!.tau2).toBeCloseTo(R.w15.sopdt.tau2, 12);
		expect(res.sopdt!.theta).toBeCloseTo(R.w15.sopdt.theta, 12);
	});

	it('adds the delay and half the sampling period', () => {
		// Skogestad 2003: a digital controller adds h/2 to the effective delay.
		const res = halfRule({ gain: 2, lags: [3], delay: 0.5, samplingPeriod: 0.2 });
		expect(res.fopdt).toEqual({ k: 2, tau: 3, theta: 0.6 });
		expect(res.sopdt).toBeNull();
		expect(res.sopdtReason).toMatch(/one lag/);
	});

	it('replaces an LHP zero larger than every lag by a gain (three cases)', () => {
		// Skogestad 2003, approximation of (T0 s+1)/(τ0 s+1) (from memory, not verified against the
		// paper): T0 ≥ τ0 ≥ θ → T0/τ0; T0 ≥ θ ≥ τ0 → T0/θ; θ ≥ T0 ≥ τ0 → 1. Values worked by hand.
		const a = halfRule({ gain: 1, lags: [2, 0.5], leads: [5], delay: 1 });
		expect(a.fopdt).toEqual({ k: 2.5, tau: 0.5, theta: 1 });
		const b = halfRule({ gain: 1, lags: [0.5, 0.2], leads: [3], delay: 1 });
		expect(b.fopdt).toEqual({ k: 3, tau: 0.2, theta: 1 });
		const c = halfRule({ gain: 1, lags: [0.5, 0.2], leads: [0.8], delay: 1 });
		expect(c.fopdt).toEqual({ k: 1, tau: 0.2, theta: 1 });
	});

	it('drops a lag cancelled exactly by a zero', () => {
		const res = halfRule({ gain: 1, lags: [4, 1], leads: [1] });
		expect(res.fopdt).toEqual({ k: 1, tau: 4, theta: 0 });
		expect(res.notes.join(' ')).toMatch(/cancels lag 1 s exactly/);
	});

	it('names the bad field', () => {
		const field = (f: () => unknown) => {
			try {
				f();
			} catch (e) {
				return e instanceof ReductionError ? e.field : 'other';
			}
			return null;
		};
		expect(field(() => halfRule({ gain: 1, lags: [] }))).toBe('lags');
		expect(field(() => halfRule({ gain: 1, lags: [1, -2] }))).toBe('lags.1');
		expect(field(() => halfRule({ gain: 0, lags: [1] }))).toBe('gain');
		expect(field(() => halfRule({ gain: 1, lags: [1], delay: Number.NaN }))).toBe('delay');
		expect(field(() => halfRule({ gain: 1, lags: [1], leads: [0.5, 0.7] }))).toBe('leads');
	});
});

describe('reduceRational: half rule from num/den coefficients', () => {
	it('W1/W2: the expanded E2 polynomials give the same reduced models', () => {
		// Skogestad 2003 example E2; coefficients expanded with numpy.polymul and reduced models in
		// fixture reduction.e2 [C] (from numpy.roots). The triple lag 0.05 must be recognised as real.
		const res = reduceRational(R.e2.num, R.e2.den, 0);
		expect(res.ok).toBe(true);
		if (!res.ok) return;
		expect(res.fopdt.k).toBeCloseTo(1, 12);
		expect(res.fopdt.tau).toBeCloseTo(2.5, 9);
		expect(res.fopdt.theta).toBeCloseTo(1.47, 9);
		expect(res.sopdt!.tau1).toBeCloseTo(2, 9);
		expect(res.sopdt!.tau2).toBeCloseTo(1.2, 9);
		expect(res.sopdt!.theta).toBeCloseTo(0.77, 9);
		expect(res.rhpZeros.map((t) => Number(t.toFixed(9)))).toEqual([0.3]);
		expect(res.leads.map((t) => Number(t.toFixed(9)))).toEqual([0.08]);
	});

	it('W4 and W15(b) from their expanded denominators, with the delay passed through', () => {
		// Fixtures reduction.w4 and reduction.w15 [C]; delay adds to θ (Skogestad 2003).
		const w4 = reduceRational([1], R.w4.den, 0.5);
		expect(w4.ok).toBe(true);
		if (!w4.ok) return;
		expect(w4.fopdt.tau).toBeCloseTo(R.w4.fopdt.tau, 9);
		expect(w4.fopdt.theta).toBeCloseTo(R.w4.fopdt.theta + 0.5, 9);
		expect(w4.sopdt!.tau2).toBeCloseTo(R.w4.sopdt.tau2, 9);
		const w15 = reduceRational([1], R.w15.den, 0);
		expect(w15.ok).toBe(true);
		if (!w15.ok) return;
		expect(w15.fopdt.tau).toBeCloseTo(R.w15.fopdt.tau, 9);
		expect(w15.fopdt.theta).toBeCloseTo(R.w15.fopdt.theta, 9);
		expect(w15.sopdt!.theta).toBeCloseTo(R.w15.sopdt.theta, 9);
	});

	it('uses the DC gain num(0)/den(0)', () => {
		// 3/(2s+1)(s+1) scaled: den = 2s² + 3s + 1, gain 3 (final value theorem).
		const res = reduceRational([6], [4, 6, 2], 0);
		expect(res.ok && res.fopdt.k).toBe(3);
	});

	it('says why the half rule cannot be used', () => {
		const complex = reduceRational([1], [1, 0.4, 1], 0.2);
		expect(complex.ok).toBe(false);
		if (!complex.ok) {
			expect(complex.field).toBe('den');
			expect(complex.reason).toMatch(/complex poles/);
		}
		const integrating = reduceRational([1], [1, 1, 0], 0);
		expect(!integrating.ok && integrating.reason).toMatch(/IPDT/);
		const unstable = reduceRational([1], [1, -1], 0);
		expect(!unstable.ok && unstable.reason).toMatch(/unstable/);
		const zeroGain = reduceRational([1, 0], [1, 3, 2], 0);
		expect(!zeroGain.ok && zeroGain.field).toBe('num');
		const improper = reduceRational([1, 2, 3], [1, 1], 0);
		expect(!improper.ok && improper.reason).toMatch(/improper/);
		const bad = reduceRational([1], [1, Number.NaN], 0);
		expect(!bad.ok && bad.field).toBe('den');
	});
});
