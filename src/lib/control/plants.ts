/**
 * Plant-model structures of the register and their transfer functions (time in seconds,
 * frequencies in rad/s, gains in PV units per MV unit), plus recognition of a rational model as
 * one of the structures and the perturbations used by the robustness envelope.
 */
import type { TransferFunction } from './types';
import { AnalysisInputError } from './errors';
import { makeTransferFunction } from './transfer-function';
import { polyDegree, polyTrailingZeros, polyTrim } from './polynomial';

/** First order plus dead time: k·e^(−θs)/(τs + 1). */
export interface FopdtPlant {
	structure: 'fopdt';
	k: number;
	tau: number;
	theta?: number;
}
/** Overdamped second order plus dead time: k·e^(−θs)/((τs + 1)(τ₂s + 1)). */
export interface SopdtPlant {
	structure: 'sopdt';
	k: number;
	tau: number;
	tau2: number;
	theta?: number;
}
/** Underdamped second order plus dead time: k·ωn²·e^(−θs)/(s² + 2ζωn·s + ωn²). */
export interface SopdtUnderdampedPlant {
	structure: 'sopdt-underdamped';
	k: number;
	wn: number;
	zeta: number;
	theta?: number;
}
/** Integrating plus dead time: k·e^(−θs)/s (k = Kv, PV units per MV unit per second). */
export interface IpdtPlant {
	structure: 'ipdt';
	k: number;
	theta?: number;
}
/** Standard second order: k·ωn²/(s² + 2ζωn·s + ωn²), no dead time. */
export interface SecondOrderPlant {
	structure: 'second-order';
	k: number;
	wn: number;
	zeta: number;
}
/** General rational model num/den (descending powers of s) with optional dead time. */
export interface RationalPlant {
	structure: 'rational';
	num: number[];
	den: number[];
	delay?: number;
}

/** Any plant structure of the register. */
export type PlantStructure = FopdtPlant | SopdtPlant | SopdtUnderdampedPlant | IpdtPlant | SecondOrderPlant | RationalPlant;

function requirePositive(v: unknown, field: string, what: string): number {
	if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new AnalysisInputError(field, `${what} must be a finite number > 0.`);
	return v;
}
function requireNonZero(v: unknown, field: string, what: string): number {
	if (typeof v !== 'number' || !Number.isFinite(v) || v === 0) throw new AnalysisInputError(field, `${what} must be a finite, non-zero number.`);
	return v;
}
function delayOf(v: unknown, field: string): number {
	if (v === undefined || v === null) return 0;
	if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) throw new AnalysisInputError(field, 'The dead time must be a finite number ≥ 0 (seconds).');
	return v;
}

/**
 * The transfer function num/den·e^(−delay·s) of a plant structure (seconds). Throws
 * AnalysisInputError naming `${field}.<parameter>` for invalid parameters.
 */
export function plantTransferFunction(p: PlantStructure, field = 'plant'): TransferFunction {
	switch (p.structure) {
		case 'fopdt': {
			const k = requireNonZero(p.k, `${field}.k`, 'The gain k');
			const tau = requirePositive(p.tau, `${field}.tau`, 'The time constant tau');
			return { num: [k], den: [tau, 1], delay: delayOf(p.theta, `${field}.theta`) };
		}
		case 'sopdt': {
			const k = requireNonZero(p.k, `${field}.k`, 'The gain k');
			const t1 = requirePositive(p.tau, `${field}.tau`, 'The time constant tau');
			const t2 = requirePositive(p.tau2, `${field}.tau2`, 'The time constant tau2');
			return { num: [k], den: [t1 * t2, t1 + t2, 1], delay: delayOf(p.theta, `${field}.theta`) };
		}
		case 'sopdt-underdamped':
		case 'second-order': {
			const k = requireNonZero(p.k, `${field}.k`, 'The gain k');
			const wn = requirePositive(p.wn, `${field}.wn`, 'The natural frequency wn');
			if (typeof p.zeta !== 'number' || !Number.isFinite(p.zeta) || p.zeta < 0)
				throw new AnalysisInputError(`${field}.zeta`, 'The damping ratio zeta must be a finite number ≥ 0.');
			const theta = p.structure === 'sopdt-underdamped' ? delayOf(p.theta, `${field}.theta`) : 0;
			return { num: [k * wn * wn], den: [1, 2 * p.zeta * wn, wn * wn], delay: theta };
		}
		case 'ipdt': {
			const k = requireNonZero(p.k, `${field}.k`, 'The integrating gain k');
			return { num: [k], den: [1, 0], delay: delayOf(p.theta, `${field}.theta`) };
		}
		case 'rational':
			return makeTransferFunction(p.num, p.den, p.delay ?? 0, field);
		default:
			throw new AnalysisInputError(`${field}.structure`, 'Unknown plant structure.');
	}
}

/**
 * Recognises a rational model as FOPDT, SOPDT (real poles), underdamped SOPDT / standard second
 * order (complex poles) or IPDT when the numerator is a constant and the denominator has that
 * form; otherwise returns it as 'rational'. Second-order denominators with real poles map to
 * 'sopdt' with tau ≥ tau2.
 */
export function recognisePlant(g: TransferFunction): PlantStructure {
	const num = polyTrim(g.num);
	const den = polyTrim(g.den);
	const rational: RationalPlant = { structure: 'rational', num: num.slice(), den: den.slice(), delay: g.delay };
	if (num.length !== 1 || num[0] === 0) return rational;
	const dd = polyDegree(den);
	const theta = g.delay;
	if (dd === 1) {
		if (den[1] === 0) return { structure: 'ipdt', k: num[0] / den[0], theta };
		const tau = den[0] / den[1];
		if (tau <= 0) return rational;
		return { structure: 'fopdt', k: num[0] / den[1], tau, theta };
	}
	if (dd === 2 && polyTrailingZeros(den) === 0) {
		const a = den[0] / den[2];
		const b = den[1] / den[2];
		const k = num[0] / den[2];
		// den/den[2] = a·s² + b·s + 1 with a = 1/ωn², b = 2ζ/ωn.
		if (a <= 0 || b < 0) return rational;
		const wn = 1 / Math.sqrt(a);
		const zeta = (b * wn) / 2;
		if (zeta >= 1) {
			// Real poles: (τ1 s + 1)(τ2 s + 1) with τ1 + τ2 = b, τ1·τ2 = a.
			const disc = Math.sqrt(Math.max(0, b * b - 4 * a));
			const t1 = (b + disc) / 2;
			const t2 = a / t1;
			return { structure: 'sopdt', k, tau: t1, tau2: t2, theta };
		}
		if (theta > 0) return { structure: 'sopdt-underdamped', k, wn, zeta, theta };
		return { structure: 'second-order', k, wn, zeta };
	}
	return rational;
}

/** Multiplicative perturbation of a plant: gain × gainFactor, dead time × delayFactor, time constants × timeConstantFactor. */
export interface PlantPerturbation {
	gainFactor: number;
	delayFactor: number;
	timeConstantFactor: number;
}

/**
 * The perturbed plant structure. Time constants are τ, τ₂ and 1/ωn; for a rational model all
 * time constants are stretched together by substituting s → factor·s (which leaves the
 * steady-state gain of a type-0 model unchanged). An IPDT has no time constant (factor ignored).
 */
export function perturbPlant(p: PlantStructure, f: PlantPerturbation): PlantStructure {
	const g = f.gainFactor;
	const d = f.delayFactor;
	const t = f.timeConstantFactor;
	switch (p.structure) {
		case 'fopdt':
			return { ...p, k: p.k * g, tau: p.tau * t, theta: (p.theta ?? 0) * d };
		case 'sopdt':
			return { ...p, k: p.k * g, tau: p.tau * t, tau2: p.tau2 * t, theta: (p.theta ?? 0) * d };
		case 'sopdt-underdamped':
			return { ...p, k: p.k * g, wn: p.wn / t, theta: (p.theta ?? 0) * d };
		case 'second-order':
			return { ...p, k: p.k * g, wn: p.wn / t };
		case 'ipdt':
			return { ...p, k: p.k * g, theta: (p.theta ?? 0) * d };
		case 'rational': {
			const n = p.num.length - 1;
			const m = p.den.length - 1;
			const num = p.num.map((c, i) => c * g * Math.pow(t, n - i));
			const den = p.den.map((c, i) => c * Math.pow(t, m - i));
			return { structure: 'rational', num, den, delay: (p.delay ?? 0) * d };
		}
	}
}
