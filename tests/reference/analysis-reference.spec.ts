/**
 * The engine against independent SciPy computations: every case in
 * fixtures/analysis-cases.json was produced by generate_analysis_fixtures.py (Debian SciPy 1.10,
 * NumPy 1.24; numpy.roots, scipy.interpolate.pade, scipy.signal.lsim / cont2discrete with a
 * delay line, scipy.optimize.brentq / minimize_scalar). Tolerances (from the brief): poles and
 * polynomials 1e-8 relative, margins 1e-4 relative, time metrics 0.5 %.
 */
import { describe, expect, it } from 'vitest';
import { analyze, type AnalysisResponse } from '../../src/lib/control/analyze';
import type { Complex, ControllerSettings } from '../../src/lib/control/types';
import fixture from './fixtures/analysis-cases.json';

interface Case {
	name: string;
	plant: { num: number[]; den: number[]; delay: number };
	controller: ControllerSettings;
	expected: {
		tEnd: number;
		closedLoop: { num: number[]; den: number[]; poles: Complex[]; zeros: Complex[]; stable: boolean };
		stepInfo?: Record<string, number | null>;
		disturbance?: Record<string, number | null>;
		samples?: { t: number[]; y: number[]; u: number[] | null; yd: number[]; ud: number[] };
		margins: Record<string, number | number[] | null>;
	};
}

const cases = (fixture as unknown as { cases: Case[] }).cases;

function expectRel(actual: number | null | undefined, expected: number | null | undefined, rel: number, what: string, abs = 0) {
	if (expected === null || expected === undefined) {
		expect(actual ?? null, what).toBeNull();
		return;
	}
	expect(actual, what).not.toBeNull();
	const err = Math.abs((actual as number) - expected);
	expect(err, `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(rel * Math.abs(expected) + abs);
}

/** Every expected root has a distinct computed root within tol·max(|root|, floor). */
function expectRootsMatch(actual: Complex[], expected: Complex[], rel: number, what: string) {
	expect(actual.length, what).toBe(expected.length);
	const scale = Math.max(1e-300, ...expected.map((z) => Math.hypot(z.re, z.im)));
	const left = actual.slice();
	for (const e of expected) {
		let best = 0;
		const d = (z: Complex) => Math.hypot(z.re - e.re, z.im - e.im);
		for (let i = 1; i < left.length; i++) if (d(left[i]) < d(left[best])) best = i;
		const mag = Math.max(Math.hypot(e.re, e.im), 1e-8 * scale);
		expect(d(left[best]), `${what}: ${JSON.stringify(left[best])} vs ${JSON.stringify(e)}`).toBeLessThanOrEqual(rel * mag);
		left.splice(best, 1);
	}
}

function expectPolyMatch(actual: number[], expected: number[], rel: number, what: string) {
	expect(actual.length, what).toBe(expected.length);
	const scale = Math.max(...expected.map(Math.abs));
	actual.forEach((c, i) => expect(Math.abs(c - expected[i]), `${what}[${i}]`).toBeLessThanOrEqual(rel * scale));
}

describe('reference fixtures (SciPy)', () => {
	it('has at least 40 cases covering delay, all forms, integrating, RHP zeros, unstable loops', () => {
		expect(cases.length).toBeGreaterThanOrEqual(40);
		expect(cases.filter((c) => c.plant.delay > 0).length).toBeGreaterThanOrEqual(15);
		expect(cases.filter((c) => !c.expected.closedLoop.stable).length).toBeGreaterThanOrEqual(2);
		for (const form of ['ideal', 'series', 'parallel']) expect(cases.some((c) => (c.controller.form ?? 'ideal') === form)).toBe(true);
		for (const type of ['P', 'PI', 'PD', 'PID']) expect(cases.some((c) => c.controller.type === type)).toBe(true);
	});

	const results = new Map<string, AnalysisResponse>();
	const get = (c: Case) => {
		let r = results.get(c.name);
		if (!r) {
			r = analyze({ plant: c.plant, controller: c.controller, options: { tEnd: c.expected.tEnd, points: 2000, padeOrder: 5 } });
			results.set(c.name, r);
		}
		return r;
	};

	describe.each(cases.map((c) => [c.name, c] as const))('%s', (_name, c) => {
		it('closed-loop polynomials, poles and zeros (1e-8 relative) and stability', () => {
			const r = get(c);
			expect(r.closedLoop.stable).toBe(c.expected.closedLoop.stable);
			expectPolyMatch(r.closedLoop.den, c.expected.closedLoop.den, 1e-10, 'den');
			expectPolyMatch(r.closedLoop.num, c.expected.closedLoop.num, 1e-10, 'num');
			expectRootsMatch(r.closedLoop.poles, c.expected.closedLoop.poles, 1e-8, 'poles');
			expectRootsMatch(r.closedLoop.zeros, c.expected.closedLoop.zeros, 1e-8, 'zeros');
		});

		it('step and load-disturbance metrics (0.5 %) and the PV and MV trajectories of both tests', () => {
			const r = get(c);
			const e = c.expected.stepInfo;
			if (!e) {
				expect(r.stepInfo.riseTime).toBeNull();
				expect(r.stepInfo.overshootPercent).toBeNull();
				expect(r.stepInfo.settlingTime).toBeNull();
				expect(r.reasons['stepInfo.riseTime']).toMatch(/unstable/);
				return;
			}
			const s = r.stepInfo;
			expectRel(s.finalValue, e.finalValue as number, 1e-9, 'finalValue', 1e-12);
			expectRel(s.steadyStateError, e.steadyStateError as number, 1e-9, 'steadyStateError', 1e-9);
			expectRel(s.riseTime, e.riseTime, 0.005, 'riseTime');
			expectRel(s.peakTime, e.peakTime, 0.005, 'peakTime');
			expectRel(s.settlingTime, e.settlingTime, 0.005, 'settlingTime');
			expectRel(s.peak, e.peak, 0.005, 'peak');
			expectRel(s.overshootPercent, e.overshootPercent, 0.005, 'overshootPercent', 0.005);
			expectRel(s.undershootPercent, e.undershootPercent, 0.005, 'undershootPercent', 0.005);
			expectRel(s.iae, e.iae, 0.005, 'iae');
			expectRel(s.ise, e.ise, 0.005, 'ise');
			expectRel(s.itae, e.itae, 0.005, 'itae');
			if (e.peakMv === undefined || e.peakMv === null) expect(s.peakMv).toBeNull();
			else expectRel(s.peakMv, e.peakMv, 0.005, 'peakMv');
			const d = c.expected.disturbance as Record<string, number | null>;
			const di = r.disturbance.info;
			expectRel(di.finalValue, d.finalValue, 1e-9, 'disturbance finalValue', 1e-12);
			expectRel(di.peak, d.peak, 0.005, 'disturbance peak');
			expectRel(di.peakTime, d.peakTime, 0.005, 'disturbance peakTime');
			expectRel(di.iae, d.iae, 0.005, 'disturbance iae');
			if (d.peakMv !== undefined && d.peakMv !== null) expectRel(di.peakMv, d.peakMv, 0.005, 'disturbance peakMv');
			// PV and MV of both tests at 41 probe times, linearly interpolated from the 2000-point
			// responses (the MV of the set-point test is omitted when it has an impulse).
			const samples = c.expected.samples as { t: number[]; y: number[]; u: number[] | null; yd: number[]; ud: number[] };
			const at = (series: ArrayLike<number>, t: number) => {
				const k = Math.min(r.step.t.length - 2, Math.floor((t / r.step.t[r.step.t.length - 1]) * (r.step.t.length - 1)));
				const f = (t - r.step.t[k]) / (r.step.t[k + 1] - r.step.t[k]);
				return series[k] + f * (series[k + 1] - series[k]);
			};
			const probe = (name: string, ours: ArrayLike<number>, ref: number[]) => {
				const scale = Math.max(1, ...ref.map(Math.abs));
				samples.t.forEach((t, i) => expect(Math.abs(at(ours, t) - ref[i]), `${name}(${t})`).toBeLessThanOrEqual(2e-3 * scale));
			};
			probe('y', r.step.y, samples.y);
			if (samples.u) probe('u', r.step.u, samples.u);
			probe('load y', r.disturbance.y, samples.yd);
			probe('load u', r.disturbance.u, samples.ud);
		});

		it('gain and phase margins, crossovers, delay margin, Ms (1e-4 relative)', () => {
			const r = get(c);
			const m = c.expected.margins;
			expectRel(r.margins.gainMargin, m.gainMargin as number | null, 1e-4, 'gainMargin');
			expectRel(r.margins.phaseCrossover, m.phaseCrossover as number | null, 1e-4, 'phaseCrossover');
			expectRel(r.margins.phaseMargin, m.phaseMargin as number | null, 1e-4, 'phaseMargin', 1e-6);
			expectRel(r.margins.gainCrossover, m.gainCrossover as number | null, 1e-4, 'gainCrossover');
			expectRel(r.margins.delayMargin, m.delayMargin as number | null, 1e-4, 'delayMargin');
			// The lowest phase crossings (those with GM < 1e5; the engine does not seek crossings with
			// |L| < 1e-6, i.e. GM above 120 dB).
			const below = (m.phaseCrossingsBelow as unknown as { w: number; gainMargin: number }[]).filter((p) => p.gainMargin < 1e5);
			const mine = r.margins.phaseCrossings.slice().sort((a, b) => a.w - b.w);
			below.forEach((p, i) => {
				expectRel(mine[i]?.w, p.w, 1e-4, `phase crossing ${i}`);
				expectRel(mine[i]?.gainMargin, p.gainMargin, 1e-4, `gain margin at phase crossing ${i}`);
			});
			if (c.expected.closedLoop.stable) {
				expectRel(r.margins.ms, m.ms as number, 1e-4, 'ms');
				// The location of a flat maximum is less well determined than its value: 1e-3.
				if (r.margins.msFrequency === null) expect(r.reasons['margins.msFrequency']).toMatch(/ω → ∞/);
				else expectRel(r.margins.msFrequency, m.msFrequency as number | null, 1e-3, 'msFrequency');
			} else {
				expect(r.margins.ms).toBeNull();
			}
		});
	});
});
