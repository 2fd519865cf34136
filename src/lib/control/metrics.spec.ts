import { describe, expect, it } from 'vitest';
import { disturbanceMetrics, errorIntegrals, stepMetrics } from './metrics';

/** Samples of f and f′ on [0, tEnd]. */
function sample(f: (t: number) => number, df: (t: number) => number, tEnd: number, n: number, withDerivative = true) {
	const t = Float64Array.from({ length: n }, (_, i) => (tEnd * i) / (n - 1));
	return { t, y: t.map(f), dy: withDerivative ? t.map(df) : null, u: t.map(() => 1) };
}

// First-order response y = 1 − e^(−t): t(10 %) = ln(10/9), t(90 %) = ln 10, rise = ln 9 ≈ 2.2τ,
// 2 % settling = ln 50 ≈ 3.9τ; ∫e = 1, ∫e² = 1/2, ∫t·e = 1 (standard first-order results, e.g.
// Seborg, Edgar & Mellichamp, Process Dynamics and Control, ch. 5, from memory; exact integrals).
describe('step metrics on the first-order response', () => {
	for (const withDerivative of [true, false]) {
		it(`locates the 10–90 % rise and the 2 % settling between samples (${withDerivative ? 'Hermite' : 'linear'} interpolation)`, () => {
			const r = sample((t) => 1 - Math.exp(-t), (t) => Math.exp(-t), 40, 400, withDerivative);
			const { metrics } = stepMetrics(r, 1, 0.02);
			const tol = withDerivative ? 1e-6 : 2e-3;
			expect(Math.abs((metrics.riseTime as number) - Math.log(9))).toBeLessThan(tol);
			expect(Math.abs((metrics.settlingTime as number) - Math.log(50))).toBeLessThan(tol);
			expect(metrics.overshootPercent).toBe(0);
			expect(metrics.undershootPercent).toBe(0);
			// Corrected trapezoidal rule with derivatives: O(h⁴); plain trapezoidal: h²/12 ≈ 8e-4 here.
			const itol = withDerivative ? 1e-5 : 2e-3;
			expect(Math.abs((metrics.iae as number) - 1)).toBeLessThan(itol);
			expect(Math.abs((metrics.ise as number) - 0.5)).toBeLessThan(itol);
			expect(Math.abs((metrics.itae as number) - 1)).toBeLessThan(itol);
			expect(metrics.finalValue).toBe(1);
			expect(metrics.steadyStateError).toBe(0);
		});
	}
});

// Standard underdamped second order, ζ = 0.6, ωn = 5: peak time π/ωd = 0.785398, overshoot
// e^(−ζπ/√(1−ζ²)) = 9.47802 % (Ogata, Modern Control Engineering, §5-3; values W8 of the
// reference sheet, computed exactly [C]).
describe('step metrics on the exact second-order response', () => {
	const zeta = 0.6;
	const wn = 5;
	const wd = wn * Math.sqrt(1 - zeta * zeta);
	const phi = Math.acos(zeta);
	const y = (t: number) => 1 - (Math.exp(-zeta * wn * t) / Math.sqrt(1 - zeta * zeta)) * Math.sin(wd * t + phi);
	const dy = (t: number) => (wn / Math.sqrt(1 - zeta * zeta)) * Math.exp(-zeta * wn * t) * Math.sin(wd * t);
	it('finds the peak between samples (overshoot 9.47802 %, peak time 0.785398 s), rise 0.370810 s, settling 1.18860 s', () => {
		const { metrics } = stepMetrics(sample(y, dy, 4, 300), 1, 0.02);
		expect(metrics.peakTime as number).toBeCloseTo(Math.PI / wd, 6);
		expect(metrics.overshootPercent as number).toBeCloseTo(100 * Math.exp((-zeta * Math.PI) / Math.sqrt(1 - zeta * zeta)), 5);
		expect(metrics.riseTime as number).toBeCloseTo(0.37081, 5);
		expect(metrics.settlingTime as number).toBeCloseTo(1.1886, 4);
	});
	it('uses the configured band: 5 % settling 1.04581 s (W8 [C])', () => {
		const { metrics } = stepMetrics(sample(y, dy, 4, 300), 1, 0.05);
		expect(metrics.settlingTime as number).toBeCloseTo(1.04581, 4);
	});
});

describe('edge cases give null with a reason, never NaN', () => {
	it('zero final value', () => {
		const r = sample((t) => t * Math.exp(-t), (t) => (1 - t) * Math.exp(-t), 20, 200);
		const { metrics, reasons } = stepMetrics(r, 0, 0.02);
		expect(metrics.riseTime).toBeNull();
		expect(metrics.overshootPercent).toBeNull();
		expect(reasons.riseTime).toMatch(/final value is zero/);
		expect(Number.isFinite(metrics.iae as number)).toBe(true);
	});
	it('not settled within the simulated time', () => {
		const r = sample((t) => 1 - Math.exp(-0.1 * t), (t) => 0.1 * Math.exp(-0.1 * t), 10, 200);
		const { metrics, reasons } = stepMetrics(r, 1, 0.02);
		expect(metrics.settlingTime).toBeNull();
		expect(reasons.settlingTime).toMatch(/still outside/);
		expect(metrics.riseTime).toBeNull();
	});
	it('MV impulse makes the peak MV null', () => {
		const r = sample((t) => 1 - Math.exp(-t), (t) => Math.exp(-t), 20, 200);
		const { metrics, reasons } = stepMetrics(r, 1, 0.02, 1, true);
		expect(metrics.peakMv).toBeNull();
		expect(reasons.peakMv).toMatch(/impulse/);
	});
	it('negative final value: levels and overshoot are sign-aware', () => {
		const r = sample((t) => -(1 - Math.exp(-t)), (t) => -Math.exp(-t), 40, 400);
		const { metrics } = stepMetrics(r, -1, 0.02, -1);
		expect(metrics.riseTime as number).toBeCloseTo(Math.log(9), 5);
		expect(metrics.overshootPercent).toBe(0);
	});
});

describe('error integrals', () => {
	it('are exact for piecewise-linear errors, including sign changes: e = 1 − t on [0, 2] gives IAE 1, ISE 2/3, ITAE 1', () => {
		const t = [0, 0.5, 1.5, 2];
		const e = t.map((x) => 1 - x);
		const r = errorIntegrals(t, e);
		expect(r.iae).toBeCloseTo(1, 14);
		expect(r.ise).toBeCloseTo(2 / 3, 14);
		// ∫0^1 t(1−t) dt + ∫1^2 t(t−1) dt = 1/6 + 5/6 = 1.
		expect(r.itae).toBeCloseTo(1, 14);
	});
});

describe('disturbance metrics', () => {
	it('peak deviation t·e^(−t) at t = 1 (1/e), IAE 1, recovery when |y| < 2 % of the peak', () => {
		const r = sample((t) => t * Math.exp(-t), (t) => (1 - t) * Math.exp(-t), 30, 600);
		const { metrics } = disturbanceMetrics(r, 0, 0.02);
		expect(metrics.peak as number).toBeCloseTo(Math.exp(-1), 7);
		expect(metrics.peakTime as number).toBeCloseTo(1, 5);
		expect(metrics.iae as number).toBeCloseTo(1, 4);
		// t·e^(−t) = 0.02/e on the tail.
		const target = 0.02 * Math.exp(-1);
		const tRec = metrics.recoveryTime as number;
		expect(tRec * Math.exp(-tRec)).toBeCloseTo(target, 7);
	});
});
