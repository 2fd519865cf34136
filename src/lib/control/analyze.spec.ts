import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analysisToJson, analyze, sanitize, type AnalysisRequest } from './analyze';
import { defaultEndTime } from './loop-analysis';
import { AnalysisInputError } from './errors';

function allFinite(v: unknown, path = ''): string[] {
	if (typeof v === 'number') return Number.isFinite(v) ? [] : [path];
	if (Array.isArray(v)) return v.flatMap((x, i) => allFinite(x, `${path}[${i}]`));
	if (v && typeof v === 'object') return Object.entries(v).flatMap(([k, x]) => allFinite(x, `${path}.${k}`));
	return [];
}

const simc: AnalysisRequest = { plant: { num: [1.2], den: [4, 1], delay: 0.8 }, controller: { type: 'PI', kp: 2.0833333333333335, ti: 4 } };

describe('analyze: the contract of PRODUCT.md', () => {
	it('returns every contract field with the documented shapes', () => {
		const r = analyze(simc);
		expect(Object.keys(r.closedLoop)).toEqual(expect.arrayContaining(['num', 'den', 'poles', 'zeros', 'stable']));
		expect(Object.keys(r.step)).toEqual(['t', 'y', 'u']);
		expect(Object.keys(r.stepInfo)).toEqual(expect.arrayContaining(['riseTime', 'peak', 'peakTime', 'overshootPercent', 'settlingTime', 'finalValue', 'steadyStateError']));
		expect(Object.keys(r.margins)).toEqual(expect.arrayContaining(['gainMargin', 'gainMarginDb', 'phaseCrossover', 'phaseMargin', 'gainCrossover', 'ms']));
		expect(r.dominant === null || typeof r.dominant.zeta === 'number').toBe(true);
		expect(r.step.t).toHaveLength(2000);
		expect(r.step.y).toHaveLength(2000);
		expect(r.bode.w).toHaveLength(400);
		expect(r.closedLoop.stable).toBe(true);
		expect(r.closedLoop.approximation).toBe('pade');
		expect(r.stepInfo.finalValue).toBe(1);
		expect(r.stepInfo.steadyStateError).toBe(0);
		expect(r.margins.gainMargin as number).toBeCloseTo(Math.PI, 8);
		expect(r.warnings.join(' ')).toMatch(/Padé/);
		expect(allFinite(r)).toEqual([]);
	});

	it('is JSON-safe through analysisToJson: no NaN or Infinity, nulls carry reasons, the series as plain arrays', () => {
		const r = analyze({ plant: { num: [2], den: [1, 0] }, controller: { type: 'P', kp: 1 } });
		expect(r.margins.gainMargin).toBeNull();
		expect(r.reasons['margins.gainMargin']).toMatch(/no phase crossover/);
		expect(r.errorConstants.kp).toBeNull();
		expect(r.reasons['errorConstants.kp']).toMatch(/type/);
		const j = analysisToJson(r);
		expect(JSON.parse(JSON.stringify(j))).toEqual(j);
		expect(Array.isArray(j.step.y) && Array.isArray(j.disturbance.u)).toBe(true);
		expect(j.step.y).toEqual(Array.from(r.step.y));
		expect(j.disturbance.t).toEqual(Array.from(r.disturbance.t));
	});

	it('unstable loops: stable false, metrics null with the reason, never NaN', () => {
		const r = analyze({ plant: { num: [1], den: [1, 3, 3, 1] }, controller: { type: 'P', kp: 10 } });
		expect(r.closedLoop.stable).toBe(false);
		for (const k of ['riseTime', 'peak', 'peakTime', 'overshootPercent', 'settlingTime', 'finalValue', 'steadyStateError'] as const) {
			expect(r.stepInfo[k]).toBeNull();
			expect(r.reasons[`stepInfo.${k}`]).toMatch(/unstable/);
		}
		expect(r.margins.ms).toBeNull();
		// Ku = 8 for 1/(s+1)³ (phase −180° at ω = √3; standard), so GM = 0.8 at kp = 10.
		expect(r.margins.gainMargin as number).toBeCloseTo(0.8, 10);
		expect(r.margins.phaseCrossover as number).toBeCloseTo(Math.sqrt(3), 10);
		expect(allFinite(r)).toEqual([]);
	});

	it('ideal derivative with c ≠ 0: peak MV null with a reason, PV fine', () => {
		const r = analyze({ plant: { num: [1], den: [1, 6, 5, 0] }, controller: { type: 'PID', kp: 18, ti: 1.404963, td: 0.351241, c: 1 } });
		expect(r.stepInfo.peakMv).toBeNull();
		expect(r.reasons['stepInfo.peakMv']).toMatch(/impulse/);
		expect(r.stepInfo.overshootPercent as number).toBeCloseTo(61.82, 1);
	});

	it('reports error constants and steady-state errors by the final value theorem', () => {
		// P on 2/((s+1)(s+2)): Kp = L(0) = 1, e_step = 1/(1 + Kp) = 0.5 (Ogata §5-8).
		const r = analyze({ plant: { num: [2], den: [1, 3, 2] }, controller: { type: 'P', kp: 1 } });
		expect(r.errorConstants).toEqual({ systemType: 0, kp: 1, kv: 0, ka: 0 });
		expect(r.steadyState.step).toBeCloseTo(0.5, 14);
		expect(r.stepInfo.finalValue as number).toBeCloseTo(0.5, 14);
		expect(r.steadyState.ramp).toBeNull();
		expect(r.reasons['steadyState.ramp']).toMatch(/without bound/);
	});

	it('adds the optional robustness envelope and pole sweep', () => {
		const r = analyze({ ...simc, options: { points: 300 }, uncertainty: { gainPercent: 10, delayPercent: 20 }, sweep: { parameter: 'kp', from: 0.5, to: 5, count: 11 } });
		expect(r.robustness?.cases).toBe(6);
		expect(r.sweep?.values).toHaveLength(11);
	});

	it('rejects bad input with the field named', () => {
		const field = (req: unknown) => {
			try {
				analyze(req as AnalysisRequest);
			} catch (e) {
				return (e as AnalysisInputError).field;
			}
			return 'no error';
		};
		expect(field({ plant: { num: [1], den: [0, 0] }, controller: { type: 'P', kp: 1 } })).toBe('plant.den');
		expect(field({ plant: { num: [1, 2, 3], den: [1, 1] }, controller: { type: 'P', kp: 1 } })).toBe('plant.num');
		expect(field({ plant: { num: [1], den: [1, 1], delay: -1 }, controller: { type: 'P', kp: 1 } })).toBe('plant.delay');
		expect(field({ plant: { num: [1], den: [1, 1] }, controller: { type: 'PI', kp: 1, ti: 0 } })).toBe('controller.ti');
	});
});

describe('default end time', () => {
	it('is θ + 8/σmin for a stable loop and θ + 6/max Re p for an unstable one', () => {
		expect(defaultEndTime([{ re: -0.5, im: 1 }, { re: -0.5, im: -1 }, { re: -4, im: 0 }], 1, true)).toBeCloseTo(17, 12);
		expect(defaultEndTime([{ re: 0.25, im: 0 }, { re: -1, im: 0 }], 0, false)).toBeCloseTo(24, 12);
		expect(defaultEndTime([], 2, true)).toBe(3);
	});
});

describe('analyze: properties', () => {
	const plantArb = fc.record({
		k: fc.double({ min: 0.2, max: 5, noNaN: true }),
		tau: fc.double({ min: 0.5, max: 20, noNaN: true }),
		tau2: fc.double({ min: 0.05, max: 5, noNaN: true }),
		theta: fc.double({ min: 0, max: 3, noNaN: true })
	});

	it('the PV settles at the closed-loop DC gain (final value theorem), also without integral action', () => {
		fc.assert(
			fc.property(plantArb, fc.double({ min: 0.1, max: 0.5, noNaN: true }), fc.constantFrom('P', 'PI'), (p, gain, type) => {
				const kp = (gain * p.tau) / (p.k * (p.theta + p.tau2 + 0.05));
				const r = analyze({
					plant: { num: [p.k], den: [p.tau * p.tau2, p.tau + p.tau2, 1], delay: p.theta },
					controller: type === 'P' ? { type: 'P', kp } : { type: 'PI', kp, ti: p.tau }
				});
				fc.pre(r.closedLoop.stable && r.stepInfo.settlingTime !== null);
				const yEnd = r.step.y[r.step.y.length - 1];
				const expected = type === 'P' ? (kp * p.k) / (1 + kp * p.k) : 1;
				expect(r.stepInfo.finalValue as number).toBeCloseTo(expected, 12);
				expect(Math.abs(yEnd - expected)).toBeLessThan(0.02 * Math.abs(expected));
			}),
			{ numRuns: 40, seed: 23 }
		);
	});

	it('metrics are invariant under time scaling: G(αs), θ·α, ti·α, td·α, tEnd·α give times ×α, frequencies ÷α, the rest equal', () => {
		fc.assert(
			fc.property(plantArb, fc.double({ min: 0.05, max: 20, noNaN: true }), (p, alpha) => {
				const base = {
					plant: { num: [p.k], den: [p.tau * p.tau2, p.tau + p.tau2, 1], delay: p.theta },
					controller: { type: 'PID' as const, kp: (0.3 * p.tau) / (p.k * (p.theta + p.tau2 + 0.1)), ti: p.tau, td: 0.5 * p.tau2, n: 10 },
					options: { points: 800 }
				};
				const a = analyze(base);
				fc.pre(a.closedLoop.stable);
				const scaled = analyze({
					plant: { num: [p.k], den: [p.tau * p.tau2 * alpha * alpha, (p.tau + p.tau2) * alpha, 1], delay: p.theta * alpha },
					controller: { ...base.controller, ti: base.controller.ti * alpha, td: base.controller.td * alpha },
					options: { points: 800, tEnd: a.simulation.tEnd * alpha }
				});
				const rel = (x: number | null, y: number | null, f: number) => {
					expect(x === null).toBe(y === null);
					if (x !== null && y !== null) expect(Math.abs(y - x * f)).toBeLessThanOrEqual(1e-6 * Math.abs(x * f) + 1e-9);
				};
				rel(a.stepInfo.riseTime, scaled.stepInfo.riseTime, alpha);
				rel(a.stepInfo.peakTime, scaled.stepInfo.peakTime, alpha);
				rel(a.stepInfo.settlingTime, scaled.stepInfo.settlingTime, alpha);
				rel(a.stepInfo.overshootPercent, scaled.stepInfo.overshootPercent, 1);
				rel(a.stepInfo.peakMv, scaled.stepInfo.peakMv, 1);
				rel(a.stepInfo.iae, scaled.stepInfo.iae, alpha);
				rel(a.margins.gainMargin, scaled.margins.gainMargin, 1);
				rel(a.margins.phaseMargin, scaled.margins.phaseMargin, 1);
				rel(a.margins.gainCrossover, scaled.margins.gainCrossover, 1 / alpha);
				rel(a.margins.ms, scaled.margins.ms, 1);
			}),
			{ numRuns: 30, seed: 29 }
		);
	});
});

describe('the response safety net', () => {
	it('replaces a non-finite number anywhere by null, names its path in reasons and warns once', () => {
		const r = analyze({ plant: { num: [1], den: [2, 1] }, controller: { type: 'PI', kp: 1, ti: 2 }, options: { points: 50, bodePoints: 20 } });
		expect(r.warnings.some((w) => w.startsWith('Internal'))).toBe(false);
		r.margins.gainMargin = Number.POSITIVE_INFINITY;
		r.closedLoop.poles[0].im = Number.NaN;
		r.bode.magDb[3] = Number.NEGATIVE_INFINITY;
		sanitize(r);
		expect(r.margins.gainMargin).toBeNull();
		expect(r.closedLoop.poles[0].im).toBeNull();
		expect(r.bode.magDb[3]).toBeNull();
		expect(Object.keys(r.reasons).filter((k) => r.reasons[k].startsWith('not finite')).sort()).toEqual(['bode.magDb[3]', 'closedLoop.poles[0].im', 'margins.gainMargin']);
		expect(r.warnings.filter((w) => w.startsWith('Internal'))).toEqual(['Internal: 3 non-finite value(s) replaced by null or cut off (first at closedLoop.poles[0].im).']);
	});
});
