import { describe, expect, it } from 'vitest';
import { controllerPolynomials, controllerTerms, controllerTransferFunction, setpointTransferFunction } from './controller';
import { tfEval } from './transfer-function';
import { AnalysisInputError } from './errors';
import type { ControllerSettings } from './types';

const at = (s: ControllerSettings, w: number) => tfEval(controllerTransferFunction(s), 0, w);
const close = (a: { re: number; im: number }, b: { re: number; im: number }, rel: number) =>
	expect(Math.hypot(a.re - b.re, a.im - b.im)).toBeLessThanOrEqual(rel * Math.hypot(b.re, b.im));

describe('controller forms', () => {
	it('ideal filtered PID: C(s) = kp(1 + 1/(ti s) + td s/(1 + td s/n)) expanded over s(Tf s + 1)', () => {
		const { nc, dc } = controllerPolynomials(controllerTerms({ type: 'PID', kp: 2, ti: 4, td: 1, n: 10 }));
		// Tf = 0.1: nc = (2·0.1 + 2)s² + (2 + 0.5·0.1)s + 0.5, dc = 0.1s² + s (hand expansion).
		expect(nc.map((c) => +c.toFixed(12))).toEqual([2.2, 2.05, 0.5]);
		expect(dc).toEqual([0.1, 1, 0]);
	});

	it('series PID (1.2987, 2, 1.2) equals ideal (2.07792, 3.2, 0.75) — SIMC E2, Skogestad 2003; conversion of CONTROL-REFERENCE 3.1', () => {
		for (const w of [0.01, 0.3, 1, 5, 40]) close(at({ type: 'PID', form: 'series', kp: 1.2987, ti: 2, td: 1.2 }, w), at({ type: 'PID', kp: 2.07792, ti: 3.2, td: 0.75 }, w), 1e-12);
	});

	it('series filtered PID equals kp(1 + 1/(ti s))(1 + td s/(1 + Tf s)) at any frequency (definition in types.ts)', () => {
		const kp = 1.5;
		const ti = 3;
		const td = 0.8;
		const n = 8;
		for (const w of [0.05, 0.5, 2, 20]) {
			const c = at({ type: 'PID', form: 'series', kp, ti, td, n }, w);
			// Direct complex evaluation of the product.
			const tf = td / n;
			const i = { re: 1, im: -1 / (ti * w) };
			const dNum = { re: 1, im: (tf + td) * w };
			const dDen = { re: 1, im: tf * w };
			const dd = dDen.re * dDen.re + dDen.im * dDen.im;
			const d = { re: (dNum.re * dDen.re + dNum.im * dDen.im) / dd, im: (dNum.im * dDen.re - dNum.re * dDen.im) / dd };
			const expected = { re: kp * (i.re * d.re - i.im * d.im), im: kp * (i.re * d.im + i.im * d.re) };
			close(c, expected, 1e-13);
		}
	});

	it('parallel kp + ki/s + kd s/(1 + (kd/kp)/n s) equals ideal with ki = kp/ti, kd = kp·td (CONTROL-REFERENCE 3.1)', () => {
		for (const w of [0.1, 1, 10]) close(at({ type: 'PID', form: 'parallel', kp: 2, ki: 0.5, kd: 1.6, n: 12 }, w), at({ type: 'PID', kp: 2, ti: 4, td: 0.8, n: 12 }, w), 1e-13);
	});

	it('set-point weights act on P and D: Cr = b·P + I/s + c·D s/(1 + Tf s)', () => {
		const s: ControllerSettings = { type: 'PID', kp: 2, ti: 4, td: 1, n: 10, b: 0.5, c: 0.25 };
		const cr = tfEval(setpointTransferFunction(s), 0, 1.3);
		const w = 1.3;
		const tf = 0.1;
		const dTerm = { re: (2 * 1 * w * tf * w) / (1 + tf * tf * w * w), im: (2 * 1 * w) / (1 + tf * tf * w * w) };
		const expected = { re: 0.5 * 2 + 0.25 * dTerm.re, im: -0.5 / w + 0.25 * dTerm.im };
		close(cr, expected, 1e-13);
		// Defaults b = 1, c = 0 (types.ts): no derivative on the set-point.
		const def = controllerPolynomials(controllerTerms({ type: 'PID', kp: 2, ti: 4, td: 1 }));
		expect(def.nr).toEqual([2, 0.5]);
		expect(def.nc).toEqual([2, 2, 0.5]);
	});

	it('P, PI, PD reduce correctly and unused parameters are ignored', () => {
		expect(controllerPolynomials(controllerTerms({ type: 'P', kp: 3, ti: 9, td: 9 }))).toEqual({ nc: [3], nr: [3], dc: [1] });
		expect(controllerPolynomials(controllerTerms({ type: 'PI', kp: 2, ti: 4, td: 9, n: 3 })).nc).toEqual([2, 0.5]);
		expect(controllerPolynomials(controllerTerms({ type: 'PD', kp: 2, td: 0.5 })).nc).toEqual([1, 2]);
	});

	it('rejects bad settings naming the field', () => {
		const field = (s: unknown) => {
			try {
				controllerTerms(s as ControllerSettings);
			} catch (e) {
				return (e as AnalysisInputError).field;
			}
			return null;
		};
		expect(field({ type: 'PI', kp: 1, ti: 0 })).toBe('controller.ti');
		expect(field({ type: 'PI', kp: 1, ti: -2 })).toBe('controller.ti');
		expect(field({ type: 'PI', kp: 1 })).toBe('controller.ti');
		expect(field({ type: 'PID', kp: 1, ti: 1, td: 1, n: 0 })).toBe('controller.n');
		expect(field({ type: 'PID', kp: 1, ti: 1 })).toBe('controller.td');
		expect(field({ type: 'PI', ti: 1 })).toBe('controller.kp');
		expect(field({ type: 'PI', kp: Number.NaN, ti: 1 })).toBe('controller.kp');
		expect(field({ type: 'PIDD', kp: 1 })).toBe('controller.type');
		expect(field({ type: 'PI', form: 'cascade', kp: 1, ti: 1 })).toBe('controller.form');
		expect(field({ type: 'PI', form: 'parallel', kp: 1, ti: 1 })).toBe('controller.ki');
		expect(field({ type: 'PD', form: 'parallel', kp: 1, kd: -1 })).toBe('controller.kd');
		expect(field({ type: 'PI', kp: 1, ti: 2 })).toBeNull();
	});
});
