/**
 * Slider scales and the plant magnitudes they are centred on. Check values come from
 * fixtures/bench-reference.json, written by fixtures/generate_bench_fixtures.py with NumPy
 * (numpy.logspace for the logarithmic mapping, numpy.poly/numpy.roots for the time constants).
 */
import { describe, expect, it } from 'vitest';
import ref from './fixtures/bench-reference.json';
import { logScaleAround, niceStep, plantEffectiveGain, plantTimeScale, positionOf, SLIDER_STEPS, valueAt, widenToInclude, type SliderScale } from './scales';

const close = (a: number, b: number, rel = 1e-12) => expect(Math.abs(a - b)).toBeLessThanOrEqual(rel * Math.max(1, Math.abs(b)));

describe('logarithmic slider', () => {
	const scale: SliderScale = { kind: 'log', min: ref.logSlider.min, max: ref.logSlider.max };

	it('maps positions to the values of numpy.logspace (common practice: v = min·(max/min)^(p/P))', () => {
		expect(SLIDER_STEPS).toBe(1000);
		ref.logSlider.positions.forEach((p, i) => close(valueAt(scale, p), ref.logSlider.values[i], 1e-12));
	});

	it('maps values back to the same integer positions', () => {
		ref.logSlider.values.forEach((v, i) => expect(positionOf(scale, v)).toBe(ref.logSlider.positions[i]));
	});

	it('clamps outside the range and never returns NaN', () => {
		expect(positionOf(scale, 1e9)).toBe(SLIDER_STEPS);
		expect(positionOf(scale, 1e-9)).toBe(0);
		expect(positionOf(scale, -1)).toBe(0);
		expect(positionOf(scale, Number.NaN)).toBe(0);
		expect(valueAt(scale, -5)).toBe(ref.logSlider.min);
		expect(valueAt(scale, Number.NaN)).toBe(ref.logSlider.min);
	});
});

describe('linear slider', () => {
	it('maps 0…P onto min…max', () => {
		const s: SliderScale = { kind: 'linear', min: 0, max: 1 };
		expect(valueAt(s, 250)).toBe(0.25);
		expect(positionOf(s, 0.75)).toBe(750);
	});
});

describe('scale helpers', () => {
	it('centres a log scale on a value, in decades', () => {
		const s = logScaleAround(2, 1, 2);
		close(s.min, 0.2);
		close(s.max, 200);
	});

	it('widens a log scale by a factor 3 beyond a typed value and leaves values inside alone', () => {
		const s: SliderScale = { kind: 'log', min: 1, max: 10 };
		expect(widenToInclude(s, 5)).toEqual(s);
		expect(widenToInclude(s, 30).max).toBe(90);
		expect(widenToInclude(s, 0.3).min).toBeCloseTo(0.1, 15);
		expect(widenToInclude(s, -30).max).toBe(90);
	});

	it('rounds step sizes down to 1, 2 or 5 times a power of ten', () => {
		expect(niceStep(7.5)).toBe(5);
		expect(niceStep(3)).toBe(2);
		expect(niceStep(0.17)).toBeCloseTo(0.1, 15);
		expect(niceStep(0)).toBe(1);
		expect(niceStep(Number.NaN)).toBe(1);
	});
});

describe('plant magnitudes', () => {
	it('takes the sum of the time constants (a1/a0, NumPy) plus the dead time as the characteristic time', () => {
		close(plantTimeScale(ref.timeScale.den, ref.timeScale.delay), ref.timeScale.value, 1e-12);
		close(ref.timeScale.value - ref.timeScale.delay, ref.timeScale.sumOfLags, 1e-12);
	});

	it('uses 1/ωn = √(a2/a0) for a lightly damped pair, θ for a pure integrator, and never returns 0', () => {
		// ωn = 2 rad/s, ζ = 0.05: a1/a0 = 2ζ/ωn = 0.05 s, 1/ωn = 0.5 s.
		expect(plantTimeScale([1, 0.2, 4], 0)).toBeCloseTo(0.5, 12);
		expect(plantTimeScale([1, 0], 2)).toBe(2);
		expect(plantTimeScale([1, 0], 0)).toBe(1);
	});

	it('counts a right-half-plane zero (−Ts + 1) as extra dead time, a left-half-plane one not (Skogestad 2003, half rule)', () => {
		// 0.0035(−8s + 1)/(s(4s + 1))·e^(−2s): lag 4 s, dead time 2 s, RHP zero 8 s.
		expect(plantTimeScale([4, 1, 0], 2, [-0.028, 0.0035])).toBeCloseTo(14, 12);
		expect(plantTimeScale([4, 1, 0], 2, [0.028, 0.0035])).toBeCloseTo(6, 12);
	});

	it('gives the steady-state gain of a self-regulating plant and Kv·T of an integrating one', () => {
		expect(plantEffectiveGain([1.2], [4, 1], 0.8)).toBeCloseTo(1.2, 15);
		expect(plantEffectiveGain([0.5], [1, 0], 2)).toBeCloseTo(1, 15);
		expect(plantEffectiveGain([1, 0], [1, 1], 0)).toBeNull();
	});
});
