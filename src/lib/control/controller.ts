/**
 * P / PI / PD / PID controllers in ideal (ISA), series and parallel form, with optional
 * first-order derivative filter and set-point weights, reduced to one equivalent parallel
 * structure C(s) = P + I/s + D·s/(1 + Tf·s) on which the engine computes (seconds, rad/s).
 */
import type { ControllerSettings, TransferFunction } from './types';
import { AnalysisInputError } from './errors';
import { polyTrim } from './polynomial';

/**
 * Equivalent parallel terms of a controller: C(s) = p + i/s + d·s/(1 + tf·s) acting on the
 * error (feedback path), and Cr(s) = b·p + i/s + c·d·s/(1 + tf·s) acting on the set-point.
 * p dimensionless (controller gain units), i in 1/s, d in s, tf in s (0 = ideal derivative).
 */
export interface ControllerTerms {
	p: number;
	i: number;
	d: number;
	tf: number;
	b: number;
	c: number;
}

/** Shortest integral or derivative time accepted (s); shorter settings are unit mistakes. */
export const MIN_TIME = 1e-6;

const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const present = (v: unknown) => v !== undefined && v !== null;

/**
 * Validates controller settings and returns the equivalent parallel terms (see types.ts for the
 * forms). Series PID: kp(1 + 1/(ti s))(1 + td s/(1 + Tf s)) expands exactly to
 * p = kp(1 + td/ti), i = kp/ti, d = kp·td·(1 − Tf/ti) with Tf = td/n (partial fractions).
 * Set-point weights b, c act on these p and d terms. Parameters that the type does not use are
 * ignored. Integral and derivative times (also kp/ki and kd/kp) below 1e-6 s are rejected.
 * Throws AnalysisInputError naming `controller.<field>`.
 */
export function controllerTerms(s: ControllerSettings, field = 'controller'): ControllerTerms {
	if (!s || typeof s !== 'object') throw new AnalysisInputError(field, 'The controller settings are missing.');
	const type = s.type;
	if (type !== 'P' && type !== 'PI' && type !== 'PD' && type !== 'PID')
		throw new AnalysisInputError(`${field}.type`, 'The controller type must be P, PI, PD or PID.');
	const form = s.form ?? 'ideal';
	if (form !== 'ideal' && form !== 'series' && form !== 'parallel')
		throw new AnalysisInputError(`${field}.form`, 'The controller form must be ideal, series or parallel.');
	if (!present(s.kp)) throw new AnalysisInputError(`${field}.kp`, 'The proportional gain kp is required.');
	if (!isNum(s.kp) || s.kp === 0) throw new AnalysisInputError(`${field}.kp`, 'The proportional gain kp must be a finite, non-zero number.');
	const kp = s.kp;
	const hasI = type === 'PI' || type === 'PID';
	const hasD = type === 'PD' || type === 'PID';
	let n: number | null = null;
	if (hasD && present(s.n)) {
		if (!isNum(s.n) || s.n <= 0) throw new AnalysisInputError(`${field}.n`, 'The derivative filter n must be a finite number > 0 (omit it for an ideal derivative).');
		n = s.n;
	}
	const b = present(s.b) ? s.b : 1;
	const c = present(s.c) ? s.c : 0;
	if (!isNum(b)) throw new AnalysisInputError(`${field}.b`, 'The set-point weight b must be a finite number.');
	if (!isNum(c)) throw new AnalysisInputError(`${field}.c`, 'The set-point weight c must be a finite number.');

	if (form === 'parallel') {
		let i = 0;
		let d = 0;
		if (hasI) {
			if (!present(s.ki)) throw new AnalysisInputError(`${field}.ki`, 'The parallel form needs the integral gain ki (1/s).');
			if (!isNum(s.ki)) throw new AnalysisInputError(`${field}.ki`, 'The integral gain ki must be a finite number.');
			if (s.ki * kp < 0) throw new AnalysisInputError(`${field}.ki`, 'The integral gain ki must have the same sign as kp (or be 0).');
			if (Math.abs(s.ki) > 1e6 * Math.abs(kp)) throw new AnalysisInputError(`${field}.ki`, 'The integral gain ki must be at most 1e6·|kp| (an integral time of at least 1 µs).');
			i = s.ki;
		}
		if (hasD) {
			if (!present(s.kd)) throw new AnalysisInputError(`${field}.kd`, 'The parallel form needs the derivative gain kd (s).');
			if (!isNum(s.kd)) throw new AnalysisInputError(`${field}.kd`, 'The derivative gain kd must be a finite number.');
			if (s.kd * kp < 0) throw new AnalysisInputError(`${field}.kd`, 'The derivative gain kd must have the same sign as kp (or be 0).');
			if (s.kd !== 0 && Math.abs(s.kd) < 1e-6 * Math.abs(kp)) throw new AnalysisInputError(`${field}.kd`, 'The derivative gain kd must be 0 or at least 1e-6·|kp| (a derivative time of at least 1 µs).');
			d = s.kd;
		}
		const tf = d !== 0 && n !== null ? d / kp / n : 0;
		return { p: kp, i, d, tf, b, c };
	}

	let ti = Infinity;
	let td = 0;
	if (hasI) {
		if (!present(s.ti)) throw new AnalysisInputError(`${field}.ti`, 'The integral time ti (seconds) is required for PI and PID.');
		if (!isNum(s.ti) || s.ti <= 0) throw new AnalysisInputError(`${field}.ti`, 'The integral time ti must be a finite number > 0 (seconds).');
		if (s.ti < MIN_TIME) throw new AnalysisInputError(`${field}.ti`, 'The integral time ti must be at least 1e-6 s.');
		ti = s.ti;
	}
	if (hasD) {
		if (!present(s.td)) throw new AnalysisInputError(`${field}.td`, 'The derivative time td (seconds) is required for PD and PID.');
		if (!isNum(s.td) || s.td < 0) throw new AnalysisInputError(`${field}.td`, 'The derivative time td must be a finite number ≥ 0 (seconds).');
		if (s.td > 0 && s.td < MIN_TIME) throw new AnalysisInputError(`${field}.td`, 'The derivative time td must be 0 or at least 1e-6 s.');
		td = s.td;
	}
	const tf = td > 0 && n !== null ? td / n : 0;
	if (form === 'series' && hasI && td > 0) {
		return { p: kp * (1 + td / ti), i: kp / ti, d: kp * td * (1 - tf / ti), tf, b, c };
	}
	return { p: kp, i: hasI ? kp / ti : 0, d: kp * td, tf, b, c };
}

/** True when the controller is proper: no derivative, or a filtered one. */
export function controllerIsProper(t: ControllerTerms): boolean {
	return t.d === 0 || t.tf > 0;
}

/**
 * Numerators and common denominator of the controller: feedback path C = nc/dc and set-point
 * path Cr = nr/dc (descending powers of s). dc = s·(Tf·s + 1) for a filtered PID, s for PI or an
 * ideal-derivative PID, (Tf·s + 1) for a filtered PD, 1 otherwise.
 */
export function controllerPolynomials(t: ControllerTerms): { nc: number[]; nr: number[]; dc: number[] } {
	const withWeights = (p: number, d: number) => {
		if (t.i !== 0) {
			if (d !== 0 && t.tf > 0) return [p * t.tf + d, p + t.i * t.tf, t.i];
			if (d !== 0) return [d, p, t.i];
			if (t.d !== 0 && t.tf > 0) return [p * t.tf, p + t.i * t.tf, t.i];
			return [p, t.i];
		}
		if (d !== 0 && t.tf > 0) return [p * t.tf + d, p];
		if (d !== 0) return [d, p];
		if (t.d !== 0 && t.tf > 0) return [p * t.tf, p];
		return [p];
	};
	let dc: number[];
	if (t.i !== 0) dc = t.d !== 0 && t.tf > 0 ? [t.tf, 1, 0] : [1, 0];
	else dc = t.d !== 0 && t.tf > 0 ? [t.tf, 1] : [1];
	// The set-point path keeps the same denominator; when d·c = 0 but d ≠ 0 the filter factor stays.
	const nc = withWeights(t.p, t.d);
	let nr = withWeights(t.b * t.p, t.c * t.d);
	if (t.d !== 0 && t.tf === 0 && t.c * t.d === 0) nr = t.i !== 0 ? [t.b * t.p, t.i] : [t.b * t.p];
	return { nc: polyTrim(nc), nr: polyTrim(nr), dc };
}

/** The feedback-path controller C(s) as a transfer function (improper for an ideal derivative). */
export function controllerTransferFunction(s: ControllerSettings): TransferFunction {
	const { nc, dc } = controllerPolynomials(controllerTerms(s));
	return { num: nc, den: dc, delay: 0 };
}

/** The set-point-path controller Cr(s) (weights b on P and c on D) as a transfer function. */
export function setpointTransferFunction(s: ControllerSettings): TransferFunction {
	const { nr, dc } = controllerPolynomials(controllerTerms(s));
	return { num: nr, den: dc, delay: 0 };
}
