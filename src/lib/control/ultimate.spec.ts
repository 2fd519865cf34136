import { describe, expect, it } from 'vitest';
import {
	findBracketedRoot,
	ultimateFopdt,
	ultimateIpdt,
	ultimateRational,
	ultimateSopdt,
	type UltimateOutcome
} from './ultimate';
import reference from './fixtures/tuning-reference.json';

const U = reference.ultimate;

function expectUltimate(out: UltimateOutcome, ref: { ku: number; wu: number; pu: number }, digits = 9): void {
	expect(out.ok).toBe(true);
	if (!out.ok) return;
	expect(out.ku).toBeCloseTo(ref.ku, digits);
	expect(out.wu).toBeCloseTo(ref.wu, digits);
	expect(out.pu).toBeCloseTo(ref.pu, digits);
}

describe('findBracketedRoot (Brent 1973)', () => {
	it('finds √2 and refuses an interval without a sign change', () => {
		// √2 = 1.41421356237309504… (standard constant).
		expect(findBracketedRoot((x) => x * x - 2, 0, 2)).toBeCloseTo(1.4142135623730951, 14);
		expect(findBracketedRoot((x) => x * x + 1, -1, 1)).toBeNull();
	});
});

describe('ultimate data of FOPDT / SOPDT / IPDT with exact delay', () => {
	it('FOPDT K = 1.2, τ = 4, θ = 0.8: Ku = 7.085354, Pu = 2.976609', () => {
		// Phase condition of the Ziegler–Nichols cycling method (Ziegler & Nichols 1942). Check values
		// [C] from the reference sheet 2.11 and fixture ultimate.fopdt (SciPy brentq on Im G(jω) = 0).
		const out = ultimateFopdt(1.2, 4, 0.8);
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.ku).toBeCloseTo(7.085354, 6);
		expect(out.pu).toBeCloseTo(2.976609, 6);
		expect(out.wu).toBeCloseTo(2.110853, 6);
		expectUltimate(out, U.fopdt, 10);
	});

	it('keeps the plant sign for a reverse-acting FOPDT', () => {
		// Fixture ultimate.fopdtNegative (SciPy), K = −0.6, τ = 12, θ = 3.
		expectUltimate(ultimateFopdt(-0.6, 12, 3), U.fopdtNegative, 9);
	});

	it('pure delay: ωu = π/θ, Ku = 1/K', () => {
		// e^(−θs) has phase −ωθ, magnitude 1 (standard result).
		const out = ultimateFopdt(2, 0, 0.5);
		expect(out).toEqual({ ok: true, ku: 0.5, wu: 2 * Math.PI, pu: 1 });
	});

	it('reports no finite ultimate gain without dead time, with a reason', () => {
		const fo = ultimateFopdt(1, 5, 0);
		expect(fo.ok).toBe(false);
		if (!fo.ok) expect(fo.reason).toMatch(/no finite ultimate gain/);
		const so = ultimateSopdt(1, 5, 2, 0);
		expect(so.ok).toBe(false);
		const ip = ultimateIpdt(1, 0);
		expect(ip.ok).toBe(false);
	});

	it('SOPDT K = 2, τ1 = 5, τ2 = 2, θ = 1 and a double lag', () => {
		// Fixtures ultimate.sopdt and ultimate.sopdtEqual (SciPy brentq on Im G(jω) = 0).
		expectUltimate(ultimateSopdt(2, 5, 2, 1), U.sopdt, 9);
		expectUltimate(ultimateSopdt(0.8, 3, 3, 0.25), U.sopdtEqual, 8);
	});

	it('IPDT Kv = 0.5, θ = 2: ωu = π/(2θ), Ku = ωu/Kv = 1.570796, Pu = 8', () => {
		// Luyben 1996 (Ind. Eng. Chem. Res. 35, 3480–3483) test vector W13 [C]; closed form.
		const out = ultimateIpdt(0.5, 2);
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.wu).toBeCloseTo(0.785398, 6);
		expect(out.ku).toBeCloseTo(1.570796, 6);
		expect(out.pu).toBeCloseTo(8, 12);
		expectUltimate(out, U.ipdt, 12);
	});

	it('rejects a zero gain with a reason instead of Infinity', () => {
		const out = ultimateFopdt(0, 1, 1);
		expect(out.ok).toBe(false);
		if (!out.ok) expect(out.reason).toMatch(/gain/);
	});
});

describe('ultimate data of a general rational plant', () => {
	it("Ogata's ZN example 1/(s(s+1)(s+5)): Ku = 30, Pu = 2π/√5", () => {
		// Ogata, Modern Control Engineering, 5th ed., ch. 8, "ZN second method" example (Ku = 30,
		// Pu = 2.8099: from memory, not verified against the book); [C] fixture ultimate.ogata, whose
		// closed-loop poles with Ku (numpy.roots) lie on the imaginary axis at ±j√5.
		const out = ultimateRational([1], [1, 6, 5, 0], 0);
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.ku).toBeCloseTo(30, 9);
		expect(out.pu).toBeCloseTo((2 * Math.PI) / Math.sqrt(5), 10);
		expect(U.ogataClosedLoopPoles[2][1]).toBeCloseTo(out.wu, 10);
	});

	it('agrees with the structured solvers on FOPDT, SOPDT and IPDT', () => {
		// Same fixtures as above (SciPy).
		expectUltimate(ultimateRational([1.2], [4, 1], 0.8), U.fopdt, 9);
		expectUltimate(ultimateRational([2], [10, 7, 1], 1), U.sopdt, 8);
		expectUltimate(ultimateRational([0.5], [1, 0], 2), U.ipdt, 9);
		expectUltimate(ultimateRational([-0.6], [12, 1], 3), U.fopdtNegative, 8);
	});

	it('handles a lead term and an underdamped pair with delay', () => {
		// Fixtures ultimate.rationalLead and ultimate.rationalUnderdamped (SciPy unwrap + brentq).
		const lead = U.rationalLead;
		expectUltimate(ultimateRational(lead.num, lead.den, lead.delay), lead, 8);
		const ud = U.rationalUnderdamped;
		expectUltimate(ultimateRational(ud.num, ud.den, ud.delay), ud, 8);
	});

	it('reports no finite Ku when the phase never crosses −180°', () => {
		// 1/((s+1)(s+2)) tends to −180° without reaching it (standard result).
		const out = ultimateRational([1], [1, 3, 2], 0);
		expect(out.ok).toBe(false);
		if (!out.ok) expect(out.reason).toMatch(/never crosses −180°/);
		expect(ultimateRational([1, Number.NaN], [1, 1], 0).ok).toBe(false);
	});
});
