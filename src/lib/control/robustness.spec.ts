import { describe, expect, it } from 'vitest';
import { robustnessEnvelope } from './robustness';
import { analyzeLoop } from './loop-analysis';
import { controllerTerms } from './controller';
import { plantTransferFunction } from './plants';
import { AnalysisInputError } from './errors';

const plant = { structure: 'fopdt' as const, k: 1.2, tau: 4, theta: 0.8 };
const pi = { type: 'PI' as const, kp: 2.0833333333333335, ti: 4 };

describe('robustness envelope', () => {
	it('runs the full factorial grid and brackets the nominal response and metrics', () => {
		const env = robustnessEnvelope(plant, pi, { gainPercent: 20, delayPercent: 50, timeConstantPercent: 20, gainLevels: 5, delayLevels: 2, timeConstantLevels: 4 }, { points: 500 });
		expect(env.cases).toBe(40);
		expect(env.factors.gain).toEqual([0.8, 0.9, 1, 1.1, 1.2].map((v) => expect.closeTo(v, 12)));
		expect(env.factors.delay).toEqual([1, 1.5]);
		const nominal = analyzeLoop(plantTransferFunction(plant), controllerTerms(pi), { points: 500, tEnd: env.t[env.t.length - 1] });
		const y = nominal.simulation.setpoint.y;
		for (let i = 0; i < env.t.length; i++) {
			expect(env.yMin[i]).toBeLessThanOrEqual(y[i] + 1e-12);
			expect(env.yMax[i]).toBeGreaterThanOrEqual(y[i] - 1e-12);
		}
		const os = env.metrics.overshootPercent;
		expect(os.min as number).toBeLessThanOrEqual(nominal.step.overshootPercent as number);
		expect(os.max as number).toBeGreaterThanOrEqual(nominal.step.overshootPercent as number);
		const gm = env.metrics.gainMargin;
		// GM scales as 1/gain at fixed phase: the +20 % gain case gives GM = π/1.2 with the nominal delay (W5 [C]).
		expect(gm.min as number).toBeLessThanOrEqual(Math.PI / 1.2 + 1e-9);
	});

	it('with zero uncertainty the envelope collapses onto the nominal response', () => {
		const env = robustnessEnvelope(plant, pi, {}, { points: 300 });
		expect(env.cases).toBe(1);
		for (let i = 0; i < env.t.length; i++) expect(env.yMax[i] - env.yMin[i]).toBe(0);
	});

	it('counts unstable cases and leaves them out of the PV envelope', () => {
		// Kc = 2.08 with gain × 3.5 exceeds Ku = 7.09 for the +θ case.
		const env = robustnessEnvelope(plant, { type: 'P', kp: 5 }, { gainPercent: 50, delayPercent: 100 }, { points: 300 });
		expect(env.unstableCases).toBeGreaterThan(0);
		expect(env.metrics.riseTime.missing).toBeGreaterThanOrEqual(env.unstableCases);
		for (const v of [...env.yMin, ...env.yMax]) expect(Number.isFinite(v)).toBe(true);
	});

	it('rejects out-of-range percentages naming the field', () => {
		expect(() => robustnessEnvelope(plant, pi, { gainPercent: 150 })).toThrow(AnalysisInputError);
		try {
			robustnessEnvelope(plant, pi, { timeConstantPercent: -1 });
		} catch (e) {
			expect((e as AnalysisInputError).field).toBe('uncertainty.timeConstantPercent');
		}
	});
});
