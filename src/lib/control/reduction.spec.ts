import { describe, expect, it } from 'vitest';
import { ReductionError, halfRule } from './reduction';
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
