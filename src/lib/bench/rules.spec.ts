/**
 * The rule table's plant and rows and the design plant. Check values: fixtures/bench-reference.json
 * (generate_bench_fixtures.py, NumPy), which types the published formulas again — SIMC PI
 * (Skogestad 2003, eq. (1)–(2)), Ziegler–Nichols reaction-curve PID (Ziegler & Nichols 1942),
 * AMIGO PID (Åström & Hägglund 2004, from memory), the half rule (Skogestad 2003, section 3) — and
 * solves the series form as the real zeros of Ti·Td·s² + Ti·s + 1 (Åström & Hägglund 1995, §3.4).
 */
import { describe, expect, it } from 'vitest';
import ref from './fixtures/bench-reference.json';
import { commonWarnings, designPlantFor, rulePlantFor, ruleRows } from './rules';
import type { PlantStructure, TuningPlant } from '../control';

const rel = (a: number | null | undefined, b: number, tol = 1e-9) => {
	expect(a).not.toBeNull();
	expect(Math.abs((a as number) - b)).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(b)));
};

const fopdt: TuningPlant = { structure: 'fopdt', k: ref.rules.plant.k, tau: ref.rules.plant.tau, theta: ref.rules.plant.theta };

describe('rule rows in the bench form', () => {
	it('SIMC PI in ideal and parallel form (Skogestad 2003, eq. (1)–(2): Kc = τ/(K(τc+θ)), Ti = min(τ, 4(τc+θ)), τc = θ)', () => {
		const ideal = ruleRows(fopdt, 'PI', 'ideal', null).find((r) => r.rule === 'simc')!;
		rel(ideal.settings!.kp, ref.rules.simcPi.kp);
		rel(ideal.settings!.ti ?? null, ref.rules.simcPi.ti);
		expect(ideal.parameter).toBeCloseTo(ref.rules.plant.theta, 12);
		expect(ideal.parameterSymbol).toBe('τc');
		const parallel = ruleRows(fopdt, 'PI', 'parallel', null).find((r) => r.rule === 'simc')!;
		rel(parallel.settings!.kp, ref.rules.simcPiParallel.kp);
		rel(parallel.settings!.ki ?? null, ref.rules.simcPiParallel.ki);
		expect(parallel.settings!.form).toBe('parallel');
	});

	it('converts the ZN PID (Ti = 4·Td, a double zero) and AMIGO PID to the series form (real zeros, NumPy)', () => {
		const rows = ruleRows(fopdt, 'PID', 'series', 10);
		const zn = rows.find((r) => r.rule === 'zn-step')!;
		rel(zn.ideal!.kp, ref.rules.znPid.kp);
		rel(zn.settings!.kp, ref.rules.znPidSeries!.kp, 1e-7);
		rel(zn.settings!.ti ?? null, ref.rules.znPidSeries!.ti, 1e-7);
		rel(zn.settings!.td ?? null, ref.rules.znPidSeries!.td, 1e-7);
		const amigo = rows.find((r) => r.rule === 'amigo')!;
		rel(amigo.ideal!.kp, ref.rules.amigoPid.kp, 1e-9);
		rel(amigo.settings!.kp, ref.rules.amigoPidSeries!.kp, 1e-9);
		rel(amigo.settings!.ti ?? null, ref.rules.amigoPidSeries!.ti, 1e-9);
		rel(amigo.settings!.td ?? null, ref.rules.amigoPidSeries!.td, 1e-9);
		expect(amigo.settings!.n).toBe(10);
	});

	it('gives the reason for rules that do not apply, and never a settings object then', () => {
		const rows = ruleRows(fopdt, 'PD', 'ideal', null);
		const simc = rows.find((r) => r.rule === 'simc')!;
		expect(simc.settings).toBeNull();
		expect(simc.reason).toMatch(/\S/);
		expect(rows.some((r) => r.settings !== null)).toBe(true);
	});
});

describe('the plant the rules see', () => {
	const w4: PlantStructure = { structure: 'rational', num: [1], den: ref.halfRule.den, delay: 0 };

	it('reduces a rational model by the half rule: FOPDT for PI, SOPDT for PID (Skogestad 2003, section 3)', () => {
		const pi = rulePlantFor(w4, 'PI');
		expect(pi.ok).toBe(true);
		if (!pi.ok) return;
		expect(pi.reduced).toBe(true);
		expect(pi.plant.structure).toBe('fopdt');
		rel(pi.plant.tau ?? null, ref.halfRule.fopdt.tau, 1e-7);
		rel(pi.plant.theta, ref.halfRule.fopdt.theta, 1e-7);
		expect(pi.note).toMatch(/half-rule FOPDT/);
		const pid = rulePlantFor(w4, 'PID');
		expect(pid.ok && pid.plant.structure).toBe('sopdt');
		if (!pid.ok) return;
		rel(pid.plant.tau ?? null, ref.halfRule.sopdt.tau1, 1e-7);
		rel(pid.plant.tau2 ?? null, ref.halfRule.sopdt.tau2, 1e-7);
		rel(pid.plant.theta, ref.halfRule.sopdt.theta, 1e-7);
	});

	it('passes FOPDT, SOPDT and IPDT through and explains complex poles', () => {
		expect(rulePlantFor({ structure: 'fopdt', k: 1, tau: 2, theta: 1 }, 'PI')).toMatchObject({ ok: true, reduced: false, note: null });
		expect(rulePlantFor({ structure: 'ipdt', k: 0.5, theta: 2 }, 'PI')).toMatchObject({ ok: true, plant: { structure: 'ipdt', k: 0.5, theta: 2 } });
		const under = rulePlantFor({ structure: 'second-order', k: 1, wn: 2, zeta: 0.3 }, 'PI');
		expect(under.ok).toBe(false);
		if (!under.ok) expect(under.reason).toMatch(/complex poles/);
	});
});

describe('the design plant', () => {
	it('maps first- and second-order structures and explains the others', () => {
		expect(designPlantFor({ structure: 'sopdt-underdamped', k: 2, wn: 1.5, zeta: 0.4, theta: 3 })).toEqual({
			ok: true,
			plant: { structure: 'second_order', k: 2, wn: 1.5, zeta: 0.4, theta: 3 }
		});
		expect(designPlantFor({ structure: 'sopdt', k: 1, tau: 5, tau2: 2, theta: 1 })).toMatchObject({ ok: true, plant: { structure: 'sopdt', tau: 5, tau2: 2 } });
		const ipdt = designPlantFor({ structure: 'ipdt', k: 1, theta: 1 });
		expect(ipdt.ok).toBe(false);
	});
});

describe('warnings shared by most rules', () => {
	it('are lifted out once; a rule keeps its own', () => {
		const sopdt: TuningPlant = { structure: 'sopdt', k: 1, tau: 262.5, tau2: 40, theta: 22.5 };
		const rows = ruleRows(sopdt, 'PID', 'ideal', null);
		const { common, own } = commonWarnings(rows);
		// The FOPDT rules on an SOPDT model work on its half-rule reduction (Skogestad 2003) and say so.
		expect(common.some((w) => /half-rule/.test(w))).toBe(true);
		for (const w of common) {
			const carrying = rows.filter((r) => r.reason === null && r.warnings.includes(w)).length;
			expect(carrying).toBeGreaterThan(rows.filter((r) => r.reason === null).length / 2);
			for (const list of own.values()) expect(list).not.toContain(w);
		}
		for (const r of rows) for (const w of own.get(r.rule) ?? []) expect(r.warnings).toContain(w);
		expect(commonWarnings([])).toEqual({ common: [], own: new Map() });
	});
});
