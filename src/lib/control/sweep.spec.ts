import { describe, expect, it } from 'vitest';
import { sweepPoles } from './sweep';
import { AnalysisInputError } from './errors';

describe('pole sweep', () => {
	it('P gain on 1/(s(s+2)): poles −1 ± √(1 − k) follow s² + 2s + k (exact root locus, e.g. Ogata ch. 6)', () => {
		const r = sweepPoles({ num: [1], den: [1, 2, 0], delay: 0 }, { type: 'P', kp: 1 }, { parameter: 'kp', from: 0.1, to: 10, count: 31 });
		expect(r.values).toHaveLength(31);
		expect(r.trails).toHaveLength(2);
		r.values.forEach((k, i) => {
			const pair = [r.trails[0][i], r.trails[1][i]];
			for (const p of pair) {
				// Residual of s² + 2s + k at the pole.
				const re = p.re * p.re - p.im * p.im + 2 * p.re + k;
				const im = 2 * p.re * p.im + 2 * p.im;
				expect(Math.hypot(re, im)).toBeLessThan(1e-12 * (1 + k));
			}
		});
		// Breakaway at k = 1: both poles at −1 for k ≥ 1 in real part.
		const last = r.values.length - 1;
		expect(r.trails[0][last].re).toBeCloseTo(-1, 12);
		expect(r.current).toHaveLength(2);
	});

	it('trails are continuous: successive points of a trail stay close on a fine sweep', () => {
		const r = sweepPoles({ num: [1], den: [1, 3, 3, 1], delay: 0 }, { type: 'PI', kp: 1, ti: 2 }, { parameter: 'kp', from: 0.05, to: 5, count: 400 });
		for (const trail of r.trails)
			for (let i = 1; i < trail.length; i++) expect(Math.hypot(trail[i].re - trail[i - 1].re, trail[i].im - trail[i - 1].im)).toBeLessThan(0.2);
	});

	it('uses the Padé approximation for dead time and rejects parameters the form lacks', () => {
		const r = sweepPoles({ num: [1], den: [1, 1], delay: 0.5 }, { type: 'PI', kp: 1, ti: 1 }, { parameter: 'ti', from: 0.5, to: 5, count: 5, scale: 'linear' }, 3);
		expect(r.approximation).toBe('pade');
		expect(r.trails).toHaveLength(5);
		expect(() => sweepPoles({ num: [1], den: [1, 1], delay: 0 }, { type: 'PI', kp: 1, ti: 1 }, { parameter: 'td', from: 0.1, to: 1 })).toThrow(AnalysisInputError);
		expect(() => sweepPoles({ num: [1], den: [1, 1], delay: 0 }, { type: 'PI', kp: 1, ti: 1 }, { parameter: 'ki', from: 0.1, to: 1 })).toThrow(/kp, ti, td/);
	});
});
