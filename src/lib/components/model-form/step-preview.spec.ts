/**
 * The model form's step preview against SciPy: open-loop unit-step responses of invented plants
 * computed by scipy.signal.lsim and shifted by the dead time, the slowest stable time constant of
 * the poles each plant was built from (checked against numpy.roots) and the static gain from
 * numpy.polyval (tests/fixtures/model-form/generate_step_fixtures.py → step-reference.json,
 * committed).
 */
import { describe, expect, it } from 'vitest';
import reference from '../../../../tests/fixtures/model-form/step-reference.json';
import { openLoopStepAt, PREVIEW_POINTS, previewFromForm, previewHorizonSeconds, stepPreview } from './step-preview';

interface Case {
	name: string;
	num: number[];
	den: number[];
	delay: number;
	t: number[];
	y: number[];
	slowestStableTimeConstant: number | null;
	staticGain: number | null;
}
const cases = reference.cases as Case[];
const byName = (prefix: string) => cases.find((c) => c.name.startsWith(prefix))!;

describe('openLoopStepAt against scipy.signal.lsim (step-reference.json)', () => {
	it('has the fixture cases', () => {
		expect(cases.length).toBeGreaterThanOrEqual(8);
	});
	for (const c of cases) {
		it(c.name, () => {
			const y = openLoopStepAt({ num: c.num, den: c.den, delaySeconds: c.delay }, c.t);
			const scale = Math.max(1, ...c.y.map(Math.abs));
			for (let i = 0; i < c.t.length; i++) {
				expect(Math.abs(y[i] - c.y[i]), `${c.name} at t = ${c.t[i]} s`).toBeLessThan(1e-11 * scale);
			}
		});
	}
	it('is exactly zero before the dead time', () => {
		const c = byName('FOPDT');
		const y = openLoopStepAt({ num: c.num, den: c.den, delaySeconds: c.delay }, [0, 1, 7.999]);
		expect(Array.from(y)).toEqual([0, 0, 0]);
	});
});

describe('previewHorizonSeconds', () => {
	for (const c of cases.filter((x) => x.slowestStableTimeConstant !== null)) {
		it(`is the dead time plus 6 slowest time constants: ${c.name}`, () => {
			// 1/min|Re p| of the plant's factors (fixture); the factor 6 is the documented rule (e^-6 ≈ 0.25 %, common practice).
			const expected = c.delay + 6 * c.slowestStableTimeConstant!;
			expect(previewHorizonSeconds({ num: c.num, den: c.den, delaySeconds: c.delay })).toBeCloseTo(expected, 5);
		});
	}
	it('uses ten dead times for a pure integrator (no stable pole to scale by)', () => {
		const c = byName('IPDT');
		expect(previewHorizonSeconds({ num: c.num, den: c.den, delaySeconds: c.delay })).toBeCloseTo(10 * c.delay, 9);
	});
	it('uses four growth times for an unstable plant', () => {
		// One pole at s = +0.1 (1/(10s − 1)): growth time 10 s, by hand.
		expect(previewHorizonSeconds({ num: [1], den: [10, -1], delaySeconds: 2 })).toBeCloseTo(2 + 40, 9);
	});
});

describe('stepPreview', () => {
	for (const c of cases) {
		it(`final value is the static gain from numpy.polyval, or none for an integrator: ${c.name}`, () => {
			const p = stepPreview({ num: c.num, den: c.den, delaySeconds: c.delay }, 's');
			if (c.staticGain === null) {
				expect(p.finalValue).toBeNull();
				expect(p.integrating).toBe(true);
				expect(p.finalReason).toMatch(/integrates/);
			} else {
				expect(p.finalValue).toBeCloseTo(c.staticGain, 12);
				expect(p.integrating).toBe(false);
			}
			expect(p.unstable).toBe(false);
			for (const v of p.y) expect(Number.isFinite(v)).toBe(true);
		});
	}
	it('ends within e^-6 of the final value for a first-order plant (six time constants, common practice)', () => {
		const c = byName('FOPDT');
		const p = stepPreview({ num: c.num, den: c.den, delaySeconds: c.delay }, 's');
		const last = p.y[p.y.length - 1];
		expect(Math.abs(last - c.staticGain!) / c.staticGain!).toBeCloseTo(Math.exp(-6), 9);
		expect(p.t[0]).toBe(0);
		expect(p.t.length).toBe(PREVIEW_POINTS + 1);
	});
	it('draws the corner at the dead time of a biproper plant', () => {
		const c = byName('biproper');
		const p = stepPreview({ num: c.num, den: c.den, delaySeconds: c.delay }, 's');
		expect([p.t[1], p.y[1]]).toEqual([c.delay, 0]);
		// Direct feedthrough num[0]/den[0] = 2/5 right after the dead time (scipy value at t = θ in the fixture).
		expect(p.y[2]).toBeCloseTo(c.y[c.t.indexOf(c.delay)], 12);
	});
	it('flags an unstable plant and gives no final value', () => {
		const p = stepPreview({ num: [1], den: [10, -1], delaySeconds: 0 }, 's');
		expect(p.unstable).toBe(true);
		expect(p.finalValue).toBeNull();
		expect(p.finalReason).toMatch(/unstable/);
	});
	it('shows times in minutes when asked (1 min = 60 s)', () => {
		const c = byName('FOPDT');
		const s = stepPreview({ num: c.num, den: c.den, delaySeconds: c.delay }, 's');
		const m = stepPreview({ num: c.num, den: c.den, delaySeconds: c.delay }, 'min');
		expect(m.t[m.t.length - 1]).toBeCloseTo(s.t[s.t.length - 1] / 60, 12);
		expect(m.delay).toBeCloseTo(c.delay / 60, 12);
		expect(Array.from(m.y)).toEqual(Array.from(s.y));
	});
});

describe('previewFromForm', () => {
	it('reads the form in minutes: an SOPDT by ζ and ωn gives the SciPy response of the same plant in seconds', () => {
		// ζ = 0.3, ωn = 0.2 rad/s = 12 rad/min, θ = 3 s = 0.05 min, K = 0.8: the fixture's underdamped case.
		const c = byName('SOPDT underdamped');
		const out = previewFromForm({ structure: 'sopdt', sopdtForm: 'damping', k: '0.8', zeta: '0.3', wn: '12', theta: '0.05', timeUnit: 'min' });
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.plant.delaySeconds).toBeCloseTo(3, 12);
		[1, 0.12, 0.04].forEach((d, i) => expect(out.plant.den[i]).toBeCloseTo(d, 15));
		expect(out.plant.num[0]).toBeCloseTo(0.032, 15);
		const y = openLoopStepAt(out.plant, c.t);
		for (let i = 0; i < c.t.length; i++) expect(Math.abs(y[i] - c.y[i])).toBeLessThan(1e-11);
		expect(out.timeUnit).toBe('min');
	});
	it('reads an FOPDT in seconds as num [K], den [τ, 1] with the dead time', () => {
		const c = byName('FOPDT');
		const out = previewFromForm({ structure: 'fopdt', k: '2.5', tau: '40', theta: '8', timeUnit: 's' });
		expect(out.ok && out.plant).toEqual({ num: c.num, den: c.den, delaySeconds: c.delay });
	});
	it('reads rational coefficients typed with commas', () => {
		const c = byName('rational with a right-half-plane zero');
		const out = previewFromForm({ structure: 'rational', num: '-4, 1', den: '50, 15, 1', theta: '2', timeUnit: 's' });
		expect(out.ok && out.plant).toEqual({ num: c.num, den: c.den, delaySeconds: c.delay });
	});
	it('names the fields to fill in while the dynamics are incomplete or invalid', () => {
		const missing = previewFromForm({ structure: 'fopdt', k: '2', tau: '', timeUnit: 's' });
		expect(missing.ok).toBe(false);
		if (!missing.ok) expect(missing.reason).toContain('Time constant τ');
		const negative = previewFromForm({ structure: 'fopdt', k: '2', tau: '-5', timeUnit: 's' });
		expect(negative.ok).toBe(false);
		if (!negative.ok) expect(negative.reason).toContain('Time constant τ');
		const improper = previewFromForm({ structure: 'rational', num: '1, 0, 0', den: '1, 1', timeUnit: 's' });
		expect(improper.ok).toBe(false);
		if (!improper.ok) expect(improper.reason).toContain('Numerator coefficients');
	});
	it('ignores the other fields of the form (names, spans, provenance) for the preview', () => {
		const out = previewFromForm({ structure: 'ipdt', k: '0.05', theta: '10', timeUnit: 's', mvMin: '100', mvMax: '0', fitR2: '7' });
		expect(out.ok).toBe(true);
		if (out.ok) expect(out.integrating).toBe(true);
	});
});
