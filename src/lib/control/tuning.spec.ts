import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	TUNING_RULE_IDS,
	TUNING_RULES,
	TuningError,
	defaultRuleParameter,
	tune,
	tuneAll,
	type TuningControllerType,
	type TuningPlant,
	type TuningRequest,
	type TuningRuleId
} from './tuning';
import reference from './fixtures/tuning-reference.json';

/**
 * Check values. Every row below is computed [C] from the published formula of the ORIGINAL
 * paper (cited per rule) with the plant of the test vector; the literal numbers are the rounded
 * values of the reference sheet (6 significant digits) and the fixture values come from
 * scripts/reference/tuning_reference.py (NumPy/SciPy, formulas typed again independently).
 * Where the formula itself is only recalled (not read in the paper) the row says so.
 */
type Row = [number, number | null, number | null];

const FOPDT: TuningPlant = { structure: 'fopdt', k: 1.2, tau: 4, theta: 0.8 };
const IPDT: TuningPlant = { structure: 'ipdt', k: 0.5, theta: 2 };
const SOPDT: TuningPlant = { structure: 'sopdt', k: 2, tau: 5, tau2: 2, theta: 1 };

const FO = reference.tuning.fopdt.rules as unknown as Record<string, Record<string, Row>>;
const IP = reference.tuning.ipdt.rules as unknown as Record<string, Record<string, Row>>;
const SO = reference.tuning.sopdt.rules as unknown as Record<string, Record<string, Row>>;

/** Rounded sheet values (6 significant digits): relative tolerance 1e-5. */
function expectRounded(actual: number | null, expected: number | null): void {
	if (expected === null) {
		expect(actual).toBeNull();
		return;
	}
	expect(actual).not.toBeNull();
	expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(1e-5 * Math.abs(expected));
}

/** Fixture values (double precision): relative tolerance 1e-10. */
function expectFixture(actual: number | null, expected: number | null): void {
	if (expected === null) {
		expect(actual).toBeNull();
		return;
	}
	expect(actual).not.toBeNull();
	expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(1e-10 * Math.abs(expected));
}

function check(
	plant: TuningPlant,
	rule: TuningRuleId,
	controller: TuningControllerType,
	rounded: Row | null,
	fixture: Row,
	parameter?: number
): void {
	const res = tune({ plant, rule, controller, parameter });
	expect(res.rule).toBe(rule);
	expect(res.controller).toBe(controller);
	const got: Row = [res.published.kp, res.published.ti, res.published.td];
	if (rounded) rounded.forEach((v, i) => expectRounded(got[i], v));
	fixture.forEach((v, i) => expectFixture(got[i], v));
}

describe('test vector FOPDT K = 1.2, τ = 4, θ = 0.8 (reference sheet 2.11)', () => {
	it('Ziegler–Nichols reaction curve', () => {
		// Ziegler & Nichols 1942, Trans. ASME 64, 759–768: P 1/a, PI 0.9/a with reset rate 0.3/L
		// (Ti = L/0.3 as in the original paper, read via the Murray errata of Feedback Systems, 2019),
		// PID 1.2/a, 2L, 0.5L (P and PID rows from memory, not verified against the paper). a = 0.24.
		check(FOPDT, 'zn-step', 'P', [4.16667, null, null], FO['zn-step'].P);
		check(FOPDT, 'zn-step', 'PI', [3.75, 2.66667, null], FO['zn-step'].PI);
		check(FOPDT, 'zn-step', 'PID', [5.0, 1.6, 0.4], FO['zn-step'].PID);
	});

	it('Ziegler–Nichols ultimate gain with Ku, Pu from the exact-delay model', () => {
		// Ziegler & Nichols 1942: PI 0.45Ku, Pu/1.2 (original values via the Murray errata, 2019);
		// P 0.5Ku and PID 0.6Ku, Pu/2, Pu/8 from memory (consistent with Ogata's example W7).
		check(FOPDT, 'zn-ultimate', 'P', [3.54268, null, null], FO['zn-ultimate'].P);
		check(FOPDT, 'zn-ultimate', 'PI', [3.18841, 2.48051, null], FO['zn-ultimate'].PI);
		check(FOPDT, 'zn-ultimate', 'PID', [4.25121, 1.4883, 0.372076], FO['zn-ultimate'].PID);
	});

	it('Cohen–Coon (PI gain factor 0.9 + r/12)', () => {
		// Cohen & Coon 1953, Trans. ASME 75, 827–834; coefficient table as reproduced in the CRC
		// companion to Liptak's Instrument Engineers' Handbook, except the PI gain factor 0.9 + r/12
		// which is from memory (Seborg et al.), not verified against the paper (the CRC table prints 1.1).
		check(FOPDT, 'cohen-coon', 'P', [4.44444, null, null], FO['cohen-coon'].P);
		check(FOPDT, 'cohen-coon', 'PI', [3.81944, 1.88308, null], FO['cohen-coon'].PI);
		check(FOPDT, 'cohen-coon', 'PD', [5.34722, null, 0.19823], FO['cohen-coon'].PD);
		check(FOPDT, 'cohen-coon', 'PID', [5.76389, 1.81918, 0.280702], FO['cohen-coon'].PID);
	});

	it('Chien–Hrones–Reswick, four criteria', () => {
		// Chien, Hrones & Reswick 1952, Trans. ASME 74, 175–185, table as given by Åström & Hägglund
		// (1995): all coefficients from memory, not verified against the paper.
		check(FOPDT, 'chr-setpoint-0', 'P', [1.25, null, null], FO['chr-setpoint-0'].P);
		check(FOPDT, 'chr-setpoint-0', 'PI', [1.45833, 4.8, null], FO['chr-setpoint-0'].PI);
		check(FOPDT, 'chr-setpoint-0', 'PID', [2.5, 4.0, 0.4], FO['chr-setpoint-0'].PID);
		check(FOPDT, 'chr-setpoint-20', 'P', [2.91667, null, null], FO['chr-setpoint-20'].P);
		check(FOPDT, 'chr-setpoint-20', 'PI', [2.5, 4.0, null], FO['chr-setpoint-20'].PI);
		check(FOPDT, 'chr-setpoint-20', 'PID', [3.95833, 5.6, 0.376], FO['chr-setpoint-20'].PID);
		check(FOPDT, 'chr-load-0', 'P', [1.25, null, null], FO['chr-load-0'].P);
		check(FOPDT, 'chr-load-0', 'PI', [2.5, 3.2, null], FO['chr-load-0'].PI);
		check(FOPDT, 'chr-load-0', 'PID', [3.95833, 1.92, 0.336], FO['chr-load-0'].PID);
		check(FOPDT, 'chr-load-20', 'P', [2.91667, null, null], FO['chr-load-20'].P);
		check(FOPDT, 'chr-load-20', 'PI', [2.91667, 1.84, null], FO['chr-load-20'].PI);
		check(FOPDT, 'chr-load-20', 'PID', [5.0, 1.6, 0.336], FO['chr-load-20'].PID);
	});

	it('IMC-PID (Rivera, Morari & Skogestad 1986) with λ = 0.8', () => {
		// Rivera, Morari & Skogestad 1986, Ind. Eng. Chem. Process Des. Dev. 25, 252–265. PID row
		// re-derived from c = q/(1 − g̃q) with a first-order Padé delay; PI row Kc·K = τ/λ, Ti = τ
		// (table rows themselves from memory, not verified against the paper). The sheet's 4.16667
		// equals τ/(Kλ); its formula line τ/(K(λ+θ)) (Taylor delay, Seborg et al.) is our 'lambda' rule.
		check(FOPDT, 'imc', 'PI', [4.16667, 4.0, null], FO.imc.PI, 0.8);
		check(FOPDT, 'imc', 'PID', [3.05556, 4.4, 0.363636], FO.imc.PID, 0.8);
	});

	it('SIMC PI with the default τc = θ', () => {
		// Skogestad 2003, J. Process Control 13, 291–309, eqs. for FOPDT PI (read in the author's
		// README): Kc = τ1/(k(τc+θ)), Ti = min(τ1, 4(τc+θ)), τc = θ.
		check(FOPDT, 'simc', 'PI', [2.08333, 4.0, null], FO.simc.PI);
	});

	it('Lambda tuning with the default λ = τ (PI) and its Padé PID', () => {
		// Dahlin 1968 / Åström & Hägglund 2006: formulas from memory, not verified against the source.
		check(FOPDT, 'lambda', 'PI', [0.694444, 4.0, null], FO.lambda.PI);
		check(FOPDT, 'lambda', 'PID', null, FO.lambda.PID);
	});

	it('AMIGO PI and PID', () => {
		// Åström & Hägglund 2004, J. Process Control 14, 635–650: formulas from memory (Advanced PID
		// Control, 2006, ch. 7), not verified against the paper.
		check(FOPDT, 'amigo', 'PI', [1.00463, 3.10609, null], FO.amigo.PI);
		check(FOPDT, 'amigo', 'PID', [2.04167, 2.34667, 0.377358], FO.amigo.PID);
	});

	it('Tyreus–Luyben PI and PID from the exact-delay Ku, Pu', () => {
		// Tyreus & Luyben 1992, Ind. Eng. Chem. Res. 31, 2625–2628 (values as quoted by Luyben &
		// Luyben 1997, from memory, not verified against the paper).
		check(FOPDT, 'tyreus-luyben', 'PI', [2.21417, 6.54854, null], FO['tyreus-luyben'].PI);
		check(FOPDT, 'tyreus-luyben', 'PID', [3.22062, 6.54854, 0.472478], FO['tyreus-luyben'].PID);
	});

	it('gives the ideal form equal to the published one for ideal-form rules', () => {
		for (const row of tuneAll(FOPDT, 'PID')) {
			if (!row.result || row.result.published.form !== 'ideal') continue;
			expect(row.result.ideal).toEqual({ kp: row.result.published.kp, ti: row.result.published.ti, td: row.result.published.td });
		}
	});
});

describe('test vector IPDT Kv = 0.5, θ = 2 (reference sheet 2.11)', () => {
	it('SIMC, AMIGO, lambda and Tyreus–Luyben PI', () => {
		// SIMC integrating rule Kc = 1/(k′(τc+θ)), Ti = 4(τc+θ) (Skogestad 2003; from memory, not verified
		// against the paper); AMIGO integrating rows (Åström & Hägglund 2004; from memory); lambda
		// integrating PI with λ = 2θ (from memory); Tyreus & Luyben 1992 (from memory).
		check(IPDT, 'simc', 'PI', [0.5, 16, null], IP.simc.PI);
		check(IPDT, 'amigo', 'PI', [0.35, 26.8, null], IP.amigo.PI);
		check(IPDT, 'amigo', 'PID', [0.45, 16, 1.0], IP.amigo.PID);
		check(IPDT, 'lambda', 'PI', [0.555556, 10, null], IP.lambda.PI);
		check(IPDT, 'tyreus-luyben', 'PI', [0.490874, 17.6, null], IP['tyreus-luyben'].PI);
	});

	it('W13: Luyben 1996 PID for an integrator with dead time', () => {
		// Luyben 1996, Ind. Eng. Chem. Res. 35, 3480–3483 (abstract): Kc = 0.46Ku = 0.722566,
		// Td = 1/ωu = 1.273240 [C]; Ti = 2.2Pu taken from the Tyreus–Luyben table (from memory).
		const res = tune({ plant: IPDT, rule: 'tyreus-luyben', controller: 'PID' });
		expectRounded(res.ideal.kp, 0.722566);
		expectRounded(res.ideal.td, 1.27324);
		expectFixture(res.ideal.ti, IP['tyreus-luyben'].PID[1]);
		expect(res.warnings.join(' ')).toMatch(/conditionally stable/);
	});

	it('Ziegler–Nichols on the integrator: a = Kv·θ, exact Ku = π/(4θ·Kv)… via ωu = π/(2θ)', () => {
		// Reaction-curve a = R·L with R = Kv (Ziegler & Nichols 1942, definition of a); ultimate data
		// closed form (fixture ultimate.ipdt).
		check(IPDT, 'zn-step', 'PID', null, IP['zn-step'].PID);
		check(IPDT, 'zn-ultimate', 'PI', null, IP['zn-ultimate'].PI);
	});
});

describe('SOPDT models', () => {
	it('W2: SIMC PID on the half-rule SOPDT of example E2, series and ideal form', () => {
		// Skogestad 2003, example E2: SOPDT k = 1, τ1 = 2, τ2 = 1.2, θ = 0.77; series PID Kc = 1.30,
		// Ti = 2, Td = 1.2 (paper values from memory); ideal (2.07792, 3.2, 0.75) [C].
		const res = tune({ plant: { structure: 'sopdt', k: 1, tau: 2, tau2: 1.2, theta: 0.77 }, rule: 'simc', controller: 'PID' });
		expect(res.published.form).toBe('series');
		expect(res.published.kp).toBeCloseTo(2 / 1.54, 12);
		expect(res.published.ti).toBe(2);
		expect(res.published.td).toBe(1.2);
		expectRounded(res.ideal.kp, 2.07792);
		expectRounded(res.ideal.ti, 3.2);
		expectRounded(res.ideal.td, 0.75);
	});

	it('W1: SIMC PI on the half-rule FOPDT of example E2', () => {
		// Skogestad 2003, example E2: FOPDT k = 1, τ1 = 2.5, θ = 1.47; Kc = 2.5/(2·1.47) = 0.8503
		// (paper 0.85, from memory), Ti = min(2.5, 11.76) = 2.5 [C].
		const res = tune({ plant: { structure: 'fopdt', k: 1, tau: 2.5, theta: 1.47 }, rule: 'simc', controller: 'PI' });
		expect(res.published.kp).toBeCloseTo(reference.reduction.e2.simcPiKc, 6);
		expect(res.published.kp).toBeCloseTo(0.8503, 4);
		expect(res.published.ti).toBe(2.5);
	});

	it('SIMC PID on K = 2, τ1 = 5, τ2 = 2, θ = 1 matches the fixture in both forms', () => {
		// Fixture tuning.sopdt.rules.simc (SIMC formulas, Skogestad 2003; series→ideal identity).
		const res = tune({ plant: SOPDT, rule: 'simc', controller: 'PID' });
		SO.simc.PIDseries.forEach((v, i) => expectFixture([res.published.kp, res.published.ti, res.published.td][i], v));
		SO.simc.PIDideal.forEach((v, i) => expectFixture([res.ideal.kp, res.ideal.ti, res.ideal.td][i], v));
	});

	it('FOPDT-based rules use the half-rule FOPDT and say so; ultimate rules use the exact SOPDT', () => {
		// Fixture: half-rule FOPDT τ = 6, θ = 2 (Skogestad 2003) and SciPy Ku/Pu of the SOPDT.
		const zn = tune({ plant: SOPDT, rule: 'zn-step', controller: 'PID' });
		SO['zn-step'].PID.forEach((v, i) => expectFixture([zn.ideal.kp, zn.ideal.ti, zn.ideal.td][i], v));
		expect(zn.warnings.join(' ')).toMatch(/half-rule FOPDT/);
		const ult = tune({ plant: SOPDT, rule: 'zn-ultimate', controller: 'PID' });
		SO['zn-ultimate'].PID.forEach((v, i) => expectFixture([ult.ideal.kp, ult.ideal.ti, ult.ideal.td][i], v));
		expect(ult.warnings).toEqual([]);
	});

	it('accepts τ and τ2 in either order', () => {
		const a = tune({ plant: SOPDT, rule: 'simc', controller: 'PID' });
		const b = tune({ plant: { ...SOPDT, tau: 2, tau2: 5 }, rule: 'simc', controller: 'PID' });
		expect(b).toEqual(a);
	});
});

describe('rules that do not apply, bad requests and warnings', () => {
	function expectError(req: TuningRequest, code: string, field: string | null, message: RegExp): void {
		try {
			tune(req);
			expect.unreachable();
		} catch (e) {
			expect(e).toBeInstanceOf(TuningError);
			expect((e as TuningError).code).toBe(code);
			expect((e as TuningError).field).toBe(field);
			expect((e as TuningError).message).toMatch(message);
		}
	}

	it('refuses structures and controllers a rule does not publish, saying why', () => {
		expectError({ plant: IPDT, rule: 'cohen-coon', controller: 'PI' }, 'structure', 'plant.structure', /self-regulating/);
		expectError({ plant: FOPDT, rule: 'imc', controller: 'P' }, 'controller', 'controller', /does not publish a P controller/);
		expectError({ plant: FOPDT, rule: 'zn-step', controller: 'PD' }, 'controller', 'controller', /PD/);
		expectError({ plant: FOPDT, rule: 'simc', controller: 'PID' }, 'structure', 'plant.structure', /SOPDT/);
		expectError({ plant: IPDT, rule: 'lambda', controller: 'PID' }, 'controller', 'controller', /integrating/);
	});

	it('reports no finite ultimate gain for a delay-free FOPDT', () => {
		const plant: TuningPlant = { structure: 'fopdt', k: 1, tau: 3, theta: 0 };
		expectError({ plant, rule: 'zn-ultimate', controller: 'PI' }, 'no-ultimate', 'plant.theta', /no finite ultimate gain/);
		expectError({ plant, rule: 'tyreus-luyben', controller: 'PI' }, 'no-ultimate', 'plant.theta', /finite ultimate gain/);
		expectError({ plant, rule: 'zn-step', controller: 'PI' }, 'structure', 'plant.theta', /dead time/);
		expectError({ plant, rule: 'simc', controller: 'PI' }, 'parameter', 'parameter', /give τc/);
		// With an explicit τc the SIMC rule applies (Kc = τ/(kτc), Ti = min(τ, 4τc)).
		const res = tune({ plant, rule: 'simc', controller: 'PI', parameter: 1.5 });
		expect(res.published).toEqual({ form: 'ideal', kp: 2, ti: 3, td: null });
	});

	it('names the bad field of the request', () => {
		expectError({ plant: { structure: 'fopdt', k: 1, tau: -1, theta: 1 }, rule: 'simc', controller: 'PI' }, 'invalid-plant', 'plant.tau', /τ/);
		expectError({ plant: { structure: 'sopdt', k: 1, tau: 1, theta: 1 }, rule: 'simc', controller: 'PI' }, 'invalid-plant', 'plant.tau2', /τ2/);
		expectError({ plant: { structure: 'fopdt', k: 0, tau: 1, theta: 1 }, rule: 'simc', controller: 'PI' }, 'invalid-plant', 'plant.k', /gain/);
		expectError({ plant: { structure: 'fopdt', k: 1, tau: 1, theta: Number.NaN }, rule: 'simc', controller: 'PI' }, 'invalid-plant', 'plant.theta', /θ/);
		expectError({ plant: FOPDT, rule: 'simc', controller: 'PI', parameter: -2 }, 'parameter', 'parameter', /positive/);
		expectError({ plant: FOPDT, rule: 'nope' as TuningRuleId, controller: 'PI' }, 'rule', 'rule', /Unknown/);
	});

	it('warns outside the validity ranges', () => {
		// Ranges: ZN/CHR 0.1 ≤ θ/τ ≤ 1, Cohen–Coon up to 1 (common practice, from memory); IMC
		// λ/θ > 1.7 (PI) and > 0.8, λ > 0.2τ (PID) (Rivera et al. 1986, from memory); SIMC τc ≥ θ and
		// τ2 ≳ θ for PID (Skogestad 2003, read in the author's notes and slides).
		const slow: TuningPlant = { structure: 'fopdt', k: 1, tau: 1, theta: 2 };
		expect(tune({ plant: slow, rule: 'zn-step', controller: 'PI' }).warnings.join(' ')).toMatch(/above the range/);
		expect(tune({ plant: slow, rule: 'cohen-coon', controller: 'PI' }).warnings.join(' ')).toMatch(/above the range/);
		const fast: TuningPlant = { structure: 'fopdt', k: 1, tau: 100, theta: 1 };
		expect(tune({ plant: fast, rule: 'chr-load-0', controller: 'PI' }).warnings.join(' ')).toMatch(/below the range/);
		expect(tune({ plant: FOPDT, rule: 'zn-step', controller: 'PI' }).warnings).toEqual([]);
		expect(tune({ plant: FOPDT, rule: 'imc', controller: 'PI', parameter: 0.8 }).warnings.join(' ')).toMatch(/1\.7/);
		expect(tune({ plant: FOPDT, rule: 'imc', controller: 'PI' }).warnings).toEqual([]);
		expect(tune({ plant: FOPDT, rule: 'simc', controller: 'PI', parameter: 0.4 }).warnings.join(' ')).toMatch(/minimum recommended/);
		const smallTau2: TuningPlant = { structure: 'sopdt', k: 1, tau: 5, tau2: 0.5, theta: 1 };
		expect(tune({ plant: smallTau2, rule: 'simc', controller: 'PID' }).warnings.join(' ')).toMatch(/τ2 .* smaller than θ/);
		expect(tune({ plant: FOPDT, rule: 'amigo', controller: 'PID' }).warnings.join(' ')).toMatch(/conservative/);
	});

	it('never returns NaN or Infinity (Cohen–Coon PD beyond θ/τ = 3 is refused)', () => {
		expectError(
			{ plant: { structure: 'fopdt', k: 1, tau: 1, theta: 3.5 }, rule: 'cohen-coon', controller: 'PD' },
			'structure',
			'plant.theta',
			/negative derivative time/
		);
	});
});

describe('tuneAll and metadata', () => {
	it('lists every rule, with results equal to tune() and reasons for the rest', () => {
		const rows = tuneAll(IPDT, 'PI');
		expect(rows.map((r) => r.rule)).toEqual([...TUNING_RULE_IDS]);
		for (const row of rows) {
			if (row.result) expect(row.result).toEqual(tune({ plant: IPDT, rule: row.rule, controller: 'PI' }));
			else expect(row.reason.length).toBeGreaterThan(10);
		}
		const missing = rows.filter((r) => r.result === null).map((r) => r.rule);
		expect(missing).toEqual(['cohen-coon', 'chr-setpoint-0', 'chr-setpoint-20', 'chr-load-0', 'chr-load-20', 'imc']);
		const allFopdt = tuneAll(FOPDT, 'PI');
		expect(allFopdt.every((r) => r.result !== null)).toBe(true);
	});

	it('throws only for an invalid plant', () => {
		expect(() => tuneAll({ structure: 'fopdt', k: 1, tau: 0, theta: 1 }, 'PI')).toThrow(TuningError);
	});

	it('has a citation, aim, validity text and parameter description for every rule', () => {
		for (const id of TUNING_RULE_IDS) {
			const info = TUNING_RULES[id];
			expect(info.id).toBe(id);
			expect(info.citation).toMatch(/\(\d{4}\)|\d{4}/);
			expect(info.aim.length).toBeGreaterThan(10);
			expect(info.validity.length).toBeGreaterThan(10);
			expect(info.controllers.length).toBeGreaterThan(0);
		}
		expect(TUNING_RULES['cohen-coon'].notes).toMatch(/1\.1 \+ r\/12/);
		expect(TUNING_RULES.simc.parameter?.symbol).toBe('τc');
	});

	it('reports the default parameters', () => {
		// SIMC default τc = θ (Skogestad 2003); lambda λ = τ / 2θ (common practice, from memory);
		// IMC max(0.8θ, 0.2τ) for PID (from the recommendation of Rivera et al. 1986, from memory).
		expect(defaultRuleParameter('simc', FOPDT, 'PI')).toBe(0.8);
		expect(defaultRuleParameter('simc', SOPDT, 'PI')).toBe(2);
		expect(defaultRuleParameter('lambda', FOPDT, 'PI')).toBe(4);
		expect(defaultRuleParameter('lambda', IPDT, 'PI')).toBe(4);
		expect(defaultRuleParameter('imc', FOPDT, 'PID')).toBeCloseTo(0.8, 15);
		expect(defaultRuleParameter('zn-step', FOPDT, 'PI')).toBeNull();
	});
});

describe('time-scale property', () => {
	it('multiplying every time of the plant (and τc/λ) by c scales Ti, Td by c and leaves Kp unchanged', () => {
		// Dimensional homogeneity of every rule (reference sheet section 0: Ti, Td in the unit of τ, θ).
		const arbPlant = fc.oneof(
			fc.record({
				structure: fc.constant('fopdt' as const),
				k: fc.double({ min: 0.05, max: 20, noNaN: true }),
				tau: fc.double({ min: 0.1, max: 100, noNaN: true }),
				theta: fc.double({ min: 0.05, max: 50, noNaN: true })
			}),
			fc.record({
				structure: fc.constant('sopdt' as const),
				k: fc.double({ min: -20, max: -0.05, noNaN: true }),
				tau: fc.double({ min: 0.1, max: 100, noNaN: true }),
				tau2: fc.double({ min: 0.1, max: 100, noNaN: true }),
				theta: fc.double({ min: 0.05, max: 50, noNaN: true })
			}),
			fc.record({
				structure: fc.constant('ipdt' as const),
				k: fc.double({ min: 0.001, max: 5, noNaN: true }),
				theta: fc.double({ min: 0.05, max: 50, noNaN: true })
			})
		);
		fc.assert(
			fc.property(
				arbPlant,
				fc.constantFrom(...TUNING_RULE_IDS),
				fc.constantFrom<TuningControllerType>('P', 'PI', 'PD', 'PID'),
				fc.double({ min: 0.01, max: 100, noNaN: true }),
				fc.option(fc.double({ min: 0.1, max: 10, noNaN: true }), { nil: undefined }),
				(plant, rule, controller, c, paramFactor) => {
					const parameter = paramFactor === undefined ? undefined : paramFactor * plant.theta;
					let base;
					try {
						base = tune({ plant, rule, controller, parameter });
					} catch (e) {
						return e instanceof TuningError;
					}
					// IPDT gain Kv has units 1/s, so it scales by 1/c together with the time axis.
					const scaledPlant: TuningPlant =
						plant.structure === 'ipdt'
							? { ...plant, k: plant.k / c, theta: plant.theta * c }
							: plant.structure === 'sopdt'
								? { ...plant, tau: plant.tau * c, tau2: plant.tau2 * c, theta: plant.theta * c }
								: { ...plant, tau: plant.tau * c, theta: plant.theta * c };
					const scaled = tune({ plant: scaledPlant, rule, controller, parameter: parameter === undefined ? undefined : parameter * c });
					const rel = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
					const relT = (a: number | null, b: number | null) => (a === null ? b === null : b !== null && rel(a * c, b));
					return (
						rel(base.ideal.kp, scaled.ideal.kp) &&
						relT(base.ideal.ti, scaled.ideal.ti) &&
						relT(base.ideal.td, scaled.ideal.td) &&
						base.warnings.length === scaled.warnings.length
					);
				}
			),
			{ numRuns: 500 }
		);
	});

	it('a default IMC λ set exactly at 0.8·θ does not warn after rescaling (rounding at the bound)', () => {
		// Regression from the property above: FOPDT k = 0.05, τ = 0.1, θ ≈ 0.0617 — λ = 0.8·θ is the
		// default and the recommended bound of Rivera, Morari & Skogestad (1986) (from memory), so it
		// must not warn, whatever the time scale.
		// θ = 41.080788490848576 is one where (0.8·θ)/θ evaluates to 0.7999999999999999 in IEEE doubles.
		for (const theta of [0.0617, 41.080788490848576, 47.7188845822377]) {
			const r = tune({ plant: { structure: 'fopdt', k: 0.05, tau: 0.1, theta }, rule: 'imc', controller: 'PID' });
			expect(r.warnings.filter((w) => w.includes('0.8 recommended'))).toEqual([]);
		}
	});
});
