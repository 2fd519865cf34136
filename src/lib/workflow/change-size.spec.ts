/**
 * The large-change rule of the review (gain, any time constant or the dead time changed by more
 * than 20 %, or the structure changed, against the previous approved revision). The percentages
 * are plain arithmetic, (new − old)/|old| (common practice). Boundary: exactly 20 % is NOT large,
 * because the rule says "more than 20 %" — including 0.65 → 0.78, which is exactly 20 % in decimal
 * but 0.2000000000000001 in binary floating point.
 */
import { describe, expect, it } from 'vitest';
import { isLargeChange, largeChanges, relativeChange, structureVariant, type ChangeSnapshot } from './change-size';

const fopdt = (k: number, tau: number, theta: number): ChangeSnapshot => ({
	structure: 'fopdt',
	parameters: { k, tau, theta },
	gain: k,
	timeConstantSeconds: tau,
	delaySeconds: theta
});

describe('relative change and the 20 % boundary', () => {
	it.each([
		[1.0, 1.2, false, 'exactly +20 %'],
		[1.0, 0.8, false, 'exactly −20 %'],
		[0.65, 0.78, false, 'exactly +20 % in decimal, 0.2000000000000001 in binary'],
		[100, 120, false, 'exactly +20 %'],
		[30, 36, false, 'exactly +20 %'],
		[1.0, 1.2001, true, '+20.01 %'],
		[1.0, 0.7999, true, '−20.01 %'],
		[0.81, 0.65, false, '−19.75 %'],
		[0.81, 0.64, true, '−20.99 %'],
		[2, -2, true, 'sign flip, −200 %'],
		[0, 0, false, 'zero to zero'],
		[0, 5, true, 'from zero (unbounded)']
	])('%s → %s: large = %s (%s)', (from, to, large) => {
		expect(isLargeChange(from, to)).toBe(large);
	});

	it('relativeChange is signed and relative to |old|', () => {
		expect(relativeChange(-2, -1)).toBeCloseTo(0.5, 15);
		expect(relativeChange(4, 3)).toBeCloseTo(-0.25, 15);
		expect(relativeChange(0, 1)).toBeNull();
		expect(relativeChange(0, 0)).toBe(0);
	});
});

describe('largeChanges', () => {
	it('no previous approved revision: nothing is large (a first approval needs no comment)', () => {
		expect(largeChanges(null, fopdt(1, 100, 10))).toEqual([]);
	});

	it('a gain change of −35 % is named with its percentage', () => {
		const r = largeChanges(fopdt(0.81, 180, 25), fopdt(0.5265, 180, 25));
		expect(r).toHaveLength(1);
		expect(r[0].parameter).toBe('gain');
		expect(r[0].changePercent).toBeCloseTo(-35, 10);
		expect(r[0].message).toBe('gain K changed by −35 % (0.81 → 0.5265)');
	});

	it('time constant and dead time are compared too, each named', () => {
		const r = largeChanges(fopdt(1, 100, 10), fopdt(1, 130, 13));
		expect(r.map((x) => x.parameter)).toEqual(['tau', 'theta']);
		expect(r[0].message).toMatch(/time constant τ changed by \+30 %/);
		expect(r[1].message).toMatch(/dead time θ changed by \+30 %/);
	});

	it('changes of exactly 20 % everywhere are not large', () => {
		expect(largeChanges(fopdt(1, 100, 10), fopdt(1.2, 120, 8))).toEqual([]);
	});

	it('dead time added to a model without one is large (from zero)', () => {
		const r = largeChanges(fopdt(1, 100, 0), fopdt(1, 100, 2));
		expect(r).toHaveLength(1);
		expect(r[0]).toMatchObject({ parameter: 'theta', changePercent: null });
		expect(r[0].message).toMatch(/from zero/);
	});

	it('a structure change is always large, and gain/dead time still compared', () => {
		const sopdt: ChangeSnapshot = { structure: 'sopdt', parameters: { k: 2, tau: 100, tau2: 30, theta: 10 }, gain: 2, delaySeconds: 10 };
		const r = largeChanges(fopdt(1, 100, 10), sopdt);
		expect(r[0].parameter).toBe('structure');
		expect(r[0].message).toMatch(/from first order plus dead time to second order plus dead time \(two time constants\)/);
		expect(r.map((x) => x.parameter)).toEqual(['structure', 'gain']);
	});

	it('switching SOPDT from two time constants to ζ/ωn counts as a structure change', () => {
		const a: ChangeSnapshot = { structure: 'sopdt', parameters: { k: 1, tau: 10, tau2: 5, theta: 1 } };
		const b: ChangeSnapshot = { structure: 'sopdt', parameters: { k: 1, zeta: 1.06, wn: 0.14, theta: 1 } };
		expect(structureVariant(a)).not.toBe(structureVariant(b));
		expect(largeChanges(a, b)[0].parameter).toBe('structure');
	});

	it('ωn is compared as the natural period 1/ωn', () => {
		const a: ChangeSnapshot = { structure: 'second_order', parameters: { k: 1, zeta: 0.5, wn: 2 } };
		const b: ChangeSnapshot = { structure: 'second_order', parameters: { k: 1, zeta: 0.5, wn: 1.6 } };
		const r = largeChanges(a, b);
		// 1/1.6 vs 1/2: +25 %
		expect(r).toHaveLength(1);
		expect(r[0].parameter).toBe('period');
		expect(r[0].changePercent).toBeCloseTo(25, 10);
		// ζ is not a time constant: a 50 % change of ζ alone is not large
		expect(largeChanges(a, { structure: 'second_order', parameters: { k: 1, zeta: 0.75, wn: 2 } })).toEqual([]);
	});

	it('rational models compare the listing gain and a change of order is a structure change', () => {
		const a: ChangeSnapshot = { structure: 'rational', parameters: { num: [1, 2], den: [1, 3, 2] }, gain: 1, delaySeconds: 0 };
		const b: ChangeSnapshot = { structure: 'rational', parameters: { num: [1, 3], den: [1, 3, 2] }, gain: 1.5, delaySeconds: 0 };
		expect(largeChanges(a, b).map((x) => x.parameter)).toEqual(['gain']);
		const c: ChangeSnapshot = { structure: 'rational', parameters: { num: [1], den: [1, 1, 3, 2] }, gain: 0.5, delaySeconds: 0 };
		expect(largeChanges(a, c)[0].message).toMatch(/rational \(numerator order 1, denominator order 2\) to rational \(numerator order 0, denominator order 3\)/);
	});
});
