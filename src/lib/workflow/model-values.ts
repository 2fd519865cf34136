/**
 * From a revision as entered (times in the chosen unit) to what the register stores (seconds):
 * the structure parameters, the transfer function num/den/delay, and the listing columns gain and
 * time constant; and back, for pre-filling the edit form. Pure; relative imports only.
 *
 * Transfer functions of the structures (descending powers of s, s in 1/s), common practice
 * (Seborg, Edgar, Mellichamp & Doyle, Process Dynamics and Control, 4th ed., 2016, ch. 5–6, from
 * memory):
 *   FOPDT  K e^(−θs)/(τs + 1)                      num [K], den [τ, 1]
 *   SOPDT  K e^(−θs)/((τs + 1)(τ2 s + 1))            num [K], den [τ·τ2, τ + τ2, 1]
 *   SOPDT  K ωn² e^(−θs)/(s² + 2ζωn s + ωn²)         num [K ωn²], den [1, 2ζωn, ωn²]
 *   IPDT   Kv e^(−θs)/s                              num [Kv], den [1, 0]
 *   2nd order K ωn²/(s² + 2ζωn s + ωn²)              num [K ωn²], den [1, 2ζωn, ωn²]
 * Unit change t = 60·t' (minutes to seconds): τ, θ × 60; ωn and Kv ÷ 60; the coefficient of s^j
 * of a rational model × 60^j (time scaling of the Laplace transform, L{f(t/a)} = a·F(a·s)).
 */
import type { RevisionInput, SopdtForm, StructureValue, TimeUnitValue } from '../schemas/revision';

/** Structure parameters as stored: times in s, ωn in rad/s, Kv per s; rational num/den with s in 1/s. */
export interface StoredParameters {
	k?: number;
	tau?: number;
	tau2?: number;
	zeta?: number;
	wn?: number;
	theta?: number;
	num?: number[];
	den?: number[];
}

/** A manipulated or process variable of a model: its name, engineering unit and span. */
export interface SignalSpan {
	name: string;
	unit: string;
	min: number;
	max: number;
}

/** The operating point at which the model was identified (MV and PV values, a note). */
export interface OperatingPoint {
	mv: number | null;
	pv: number | null;
	note: string | null;
}

/** What a revision stores about its dynamics. */
export interface StoredModel {
	structure: StructureValue;
	parameters: StoredParameters;
	num: number[];
	den: number[];
	delaySeconds: number;
	/** K, Kv (per s), or for rational models the DC gain (integrating gain when den has roots at 0). */
	gain: number | null;
	/** Dominant time constant in s (see `listingColumns`); null for IPDT and rational models. */
	timeConstantSeconds: number | null;
}

/** Seconds per time unit. */
export function secondsPer(unit: TimeUnitValue): number {
	return unit === 'min' ? 60 : 1;
}

/** Drops binary noise left by a unit conversion (12 significant digits). */
function clean(x: number): number {
	return x === 0 ? 0 : Number(x.toPrecision(12));
}

/** Polynomial in s' (1/unit) → polynomial in s (1/s): coefficient of s^j times f^j. */
function rescaleToSeconds(coefficients: readonly number[], f: number): number[] {
	const n = coefficients.length - 1;
	return coefficients.map((c, i) => clean(c * f ** (n - i)));
}
function rescaleFromSeconds(coefficients: readonly number[], f: number): number[] {
	const n = coefficients.length - 1;
	return coefficients.map((c, i) => clean(c / f ** (n - i)));
}

/** The transfer function num/den·e^(−delay·s) of stored parameters (seconds). */
export function transferFunctionOf(structure: StructureValue, p: StoredParameters): { num: number[]; den: number[]; delay: number } {
	const k = p.k ?? 0;
	const theta = p.theta ?? 0;
	switch (structure) {
		case 'fopdt':
			return { num: [k], den: [p.tau ?? 0, 1], delay: theta };
		case 'sopdt':
			if (p.tau2 !== undefined && p.tau !== undefined) {
				return { num: [k], den: [p.tau * p.tau2, p.tau + p.tau2, 1], delay: theta };
			}
			return secondOrder(k, p.zeta ?? 0, p.wn ?? 0, theta);
		case 'second_order':
			return secondOrder(k, p.zeta ?? 0, p.wn ?? 0, 0);
		case 'ipdt':
			return { num: [k], den: [1, 0], delay: theta };
		case 'rational':
			return { num: [...(p.num ?? [])], den: [...(p.den ?? [])], delay: theta };
	}
}

function secondOrder(k: number, zeta: number, wn: number, delay: number) {
	return { num: [k * wn * wn], den: [1, 2 * zeta * wn, wn * wn], delay };
}

/**
 * The listing columns of a revision (the same definitions as the demo data). `gain`: K (FOPDT,
 * SOPDT, second order), Kv (IPDT), or for rational models lim s→0 of s^r·G(s) with r the number of
 * poles at the origin. `timeConstantSeconds`: the time constant −1/Re(p) of the slowest pole off
 * the origin — τ (FOPDT); max(τ, τ2) (SOPDT); 1/(ζωn) for ζ < 1 and 1/(ωn(ζ − √(ζ² − 1))) for
 * ζ ≥ 1 (Ogata, Modern Control Engineering, 5th ed., 2010, §5-3, poles −ζωn ± ωn√(ζ² − 1), from memory);
 * null for IPDT and rational models.
 */
export function listingColumns(structure: StructureValue, p: StoredParameters): { gain: number | null; timeConstantSeconds: number | null } {
	switch (structure) {
		case 'fopdt':
			return { gain: p.k ?? null, timeConstantSeconds: p.tau ?? null };
		case 'sopdt':
			if (p.tau !== undefined && p.tau2 !== undefined) return { gain: p.k ?? null, timeConstantSeconds: Math.max(p.tau, p.tau2) };
			return { gain: p.k ?? null, timeConstantSeconds: dampedTimeConstant(p.zeta, p.wn) };
		case 'second_order':
			return { gain: p.k ?? null, timeConstantSeconds: dampedTimeConstant(p.zeta, p.wn) };
		case 'ipdt':
			return { gain: p.k ?? null, timeConstantSeconds: null };
		case 'rational': {
			const num = p.num ?? [];
			const den = p.den ?? [];
			let r = 0;
			while (r < den.length - 1 && den[den.length - 1 - r] === 0) r++;
			const d0 = den[den.length - 1 - r];
			const n0 = num[num.length - 1];
			const g = d0 ? n0 / d0 : NaN;
			return { gain: Number.isFinite(g) ? g : null, timeConstantSeconds: null };
		}
	}
}

function dampedTimeConstant(zeta: number | undefined, wn: number | undefined): number | null {
	if (zeta === undefined || wn === undefined || !(zeta > 0) || !(wn > 0)) return null;
	return zeta < 1 ? 1 / (zeta * wn) : 1 / (wn * (zeta - Math.sqrt(zeta * zeta - 1)));
}

/** The stored parameters of a validated revision (times converted from its unit to seconds). */
export function storedParameters(input: RevisionInput): StoredParameters {
	const f = secondsPer(input.timeUnit);
	const t = (x: number | null) => (x === null ? undefined : clean(x * f));
	const theta = input.theta ?? 0;
	switch (input.structure) {
		case 'fopdt':
			return { k: input.k ?? undefined, tau: t(input.tau), theta: clean(theta * f) };
		case 'sopdt':
			return input.sopdtForm === 'damping'
				? { k: input.k ?? undefined, zeta: input.zeta ?? undefined, wn: input.wn === null ? undefined : clean(input.wn / f), theta: clean(theta * f) }
				: { k: input.k ?? undefined, tau: t(input.tau), tau2: t(input.tau2), theta: clean(theta * f) };
		case 'ipdt':
			return { k: input.k === null ? undefined : clean(input.k / f), theta: clean(theta * f) };
		case 'second_order':
			return { k: input.k ?? undefined, zeta: input.zeta ?? undefined, wn: input.wn === null ? undefined : clean(input.wn / f) };
		case 'rational':
			return { num: rescaleToSeconds(input.num ?? [], f), den: rescaleToSeconds(input.den ?? [], f), theta: clean(theta * f) };
	}
}

/** Everything a revision stores about its dynamics, from the validated input. */
export function toStoredModel(input: RevisionInput): StoredModel {
	const parameters = storedParameters(input);
	const tf = transferFunctionOf(input.structure, parameters);
	const cols = listingColumns(input.structure, parameters);
	return {
		structure: input.structure,
		parameters,
		num: tf.num,
		den: tf.den,
		delaySeconds: tf.delay,
		gain: cols.gain,
		timeConstantSeconds: cols.timeConstantSeconds
	};
}

/** The parameter fields of the edit form (in `unit`) from stored parameters (seconds). */
export function parametersForForm(
	structure: StructureValue,
	p: StoredParameters,
	unit: TimeUnitValue
): Pick<RevisionInput, 'sopdtForm' | 'k' | 'tau' | 'tau2' | 'zeta' | 'wn' | 'theta' | 'num' | 'den'> {
	const f = secondsPer(unit);
	const t = (x: number | undefined) => (x === undefined ? null : clean(x / f));
	const sopdtForm: SopdtForm | null = structure === 'sopdt' ? (p.tau2 !== undefined ? 'time_constants' : 'damping') : null;
	const uses = (x: string) => {
		switch (structure) {
			case 'fopdt':
				return ['k', 'tau', 'theta'].includes(x);
			case 'sopdt':
				return (sopdtForm === 'damping' ? ['k', 'zeta', 'wn', 'theta'] : ['k', 'tau', 'tau2', 'theta']).includes(x);
			case 'ipdt':
				return ['k', 'theta'].includes(x);
			case 'second_order':
				return ['k', 'zeta', 'wn'].includes(x);
			case 'rational':
				return ['num', 'den', 'theta'].includes(x);
		}
	};
	return {
		sopdtForm,
		k: uses('k') && p.k !== undefined ? (structure === 'ipdt' ? clean(p.k * f) : p.k) : null,
		tau: uses('tau') ? t(p.tau) : null,
		tau2: uses('tau2') ? t(p.tau2) : null,
		zeta: uses('zeta') ? (p.zeta ?? null) : null,
		wn: uses('wn') && p.wn !== undefined ? clean(p.wn * f) : null,
		theta: uses('theta') ? (t(p.theta) ?? 0) : null,
		num: structure === 'rational' ? rescaleFromSeconds(p.num ?? [], f) : null,
		den: structure === 'rational' ? rescaleFromSeconds(p.den ?? [], f) : null
	};
}
