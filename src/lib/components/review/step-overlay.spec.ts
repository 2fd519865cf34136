/**
 * The open-loop step responses of the history comparison against SciPy: scipy.signal.step of each
 * num/den shifted by the dead time, and the slowest pole from numpy.roots, both computed by
 * tests/fixtures/review/generate_review_fixtures.py (Debian's Python 3 with NumPy/SciPy) into
 * review-reference.json.
 */
import { describe, expect, it } from 'vitest';
import reference from '../../../../tests/fixtures/review/review-reference.json';
import { INTEGRATING_DEAD_TIMES, MIN_HORIZON_SECONDS, SETTLING_MULTIPLE, stepHorizonSeconds, stepOverlay } from './step-overlay';

describe('stepOverlay: open-loop unit step responses (reference: scipy.signal.step, shifted by θ)', () => {
	for (const c of reference.steps) {
		it(`${c.name}: every sample within 1e-6 of SciPy's (relative to the final value)`, () => {
			const plant = { num: c.num, den: c.den, delay: c.delay };
			const o = stepOverlay(plant, plant, { tEndSeconds: c.tEnd, points: c.points });
			expect(o.t).toHaveLength(c.points);
			expect(o.notes).toEqual([]);
			const scale = Math.max(...c.samples.map((s) => Math.abs(s.y)));
			for (const s of c.samples) {
				expect(o.t[s.i]).toBeCloseTo(s.t, 9);
				expect(o.from[s.i], `${c.name} y(${s.t})`).not.toBeNull();
				expect(Math.abs((o.from[s.i] as number) - s.y) / scale, `${c.name} y(${s.t}) = ${s.y}`).toBeLessThan(1e-6);
				expect(o.to[s.i]).toBe(o.from[s.i]);
			}
		});
	}

	it('keeps the two revisions apart: a changed gain scales the newer response only', () => {
		const c = reference.steps[0];
		const older = { num: c.num, den: c.den, delay: c.delay };
		const newer = { num: c.num.map((x) => x * 1.3), den: c.den, delay: c.delay };
		const o = stepOverlay(older, newer, { tEndSeconds: c.tEnd, points: c.points });
		const last = c.samples[c.samples.length - 1];
		expect(Math.abs((o.from[last.i] as number) - last.y)).toBeLessThan(1e-6);
		expect(Math.abs((o.to[last.i] as number) - 1.3 * last.y)).toBeLessThan(1e-6);
	});

	it('is zero during the dead time (θ = 45 s, reference: the shifted SciPy step is 0 before θ)', () => {
		const c = reference.steps[0];
		const o = stepOverlay({ num: c.num, den: c.den, delay: c.delay }, { num: c.num, den: c.den, delay: c.delay }, { tEndSeconds: c.tEnd, points: c.points });
		for (let i = 0; o.t[i] < c.delay; i++) expect(o.from[i]).toBe(0);
	});

	it('reports an improper plant in words and draws nothing for it (never NaN)', () => {
		const o = stepOverlay({ num: [1, 0, 0], den: [1, 1], delay: 0 }, { num: [1], den: [10, 1], delay: 0 }, { tEndSeconds: 50, points: 51 });
		expect(o.from.every((v) => v === null)).toBe(true);
		expect(o.to.every((v) => typeof v === 'number' && Number.isFinite(v))).toBe(true);
		expect(o.notes.join(' ')).toMatch(/older revision response cannot be computed/);
	});

	it('cuts an unstable plant and says so, with no NaN or Infinity in the data', () => {
		const o = stepOverlay({ num: [1], den: [1, -1], delay: 0 }, { num: [1], den: [1, 1], delay: 0 }, { tEndSeconds: 100, points: 101 });
		expect(o.notes.join(' ')).toMatch(/grows without bound/);
		for (const v of o.from) expect(v === null || Number.isFinite(v)).toBe(true);
	});
});

describe('stepHorizonSeconds: θ + 5·τslow (τslow from numpy.roots), 10·θ for integrators', () => {
	for (const c of reference.horizons) {
		it(`${c.name}: τslow = ${c.slowestTimeConstant?.toPrecision(4)} s`, () => {
			const expected = c.delay + SETTLING_MULTIPLE * (c.slowestTimeConstant as number);
			expect(stepHorizonSeconds({ num: c.num, den: c.den, delay: c.delay })).toBeCloseTo(expected, 6);
		});
	}
	it('a pure integrator (IPDT, Kv = 0.0055, θ = 2 s) gets 10·θ, at least 10 s', () => {
		expect(stepHorizonSeconds({ num: [0.0055], den: [1, 0], delay: 20 })).toBe(INTEGRATING_DEAD_TIMES * 20);
		expect(stepHorizonSeconds({ num: [0.0055], den: [1, 0], delay: 0.2 })).toBe(MIN_HORIZON_SECONDS);
	});
	it('the overlay uses the longer of the two horizons', () => {
		const fast = { num: [1], den: [10, 1], delay: 0 };
		const slow = { num: [1], den: [300, 1], delay: 20 };
		expect(stepOverlay(fast, slow, { points: 11 }).tEndSeconds).toBeCloseTo(20 + 5 * 300, 9);
	});
});
