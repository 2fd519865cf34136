/**
 * SISO transfer functions num(s)/den(s)·e^(−delay·s): construction, interconnection, DC gain,
 * system type, relative degree, evaluation, cancellation of common roots and Padé approximation
 * of the dead time. Time in seconds.
 */
import type { Complex, TransferFunction } from './types';
import { AnalysisInputError } from './errors';
import {
	polyAdd,
	polyDegree,
	polyDivide,
	polyEvalComplex,
	polyFromRoots,
	polyMul,
	polyScale,
	polyScaleArgument,
	polyTrailingZeros,
	polyTrim
} from './polynomial';
import { roots } from './roots';
import { modulus } from './complex';

/**
 * A validated transfer function: coefficients finite, exact leading zeros trimmed, denominator
 * not zero, delay finite and ≥ 0 (seconds). Throws AnalysisInputError naming `field`.num/.den/.delay.
 */
export function makeTransferFunction(num: readonly number[], den: readonly number[], delay = 0, field = 'plant'): TransferFunction {
	if (!Array.isArray(num) || num.some((c) => typeof c !== 'number' || !Number.isFinite(c)))
		throw new AnalysisInputError(`${field}.num`, 'The numerator must be a list of finite numbers.');
	if (!Array.isArray(den) || den.some((c) => typeof c !== 'number' || !Number.isFinite(c)))
		throw new AnalysisInputError(`${field}.den`, 'The denominator must be a list of finite numbers.');
	const n = polyTrim(num);
	const d = polyTrim(den);
	if (d.length === 0) throw new AnalysisInputError(`${field}.den`, 'The denominator is zero (empty or all coefficients 0).');
	if (typeof delay !== 'number' || !Number.isFinite(delay) || delay < 0)
		throw new AnalysisInputError(`${field}.delay`, 'The dead time must be a finite number ≥ 0 (seconds).');
	return { num: n, den: d, delay };
}

/** a·b in series; dead times add. */
export function tfSeries(a: TransferFunction, b: TransferFunction): TransferFunction {
	return { num: polyMul(a.num, b.num), den: polyMul(a.den, b.den), delay: a.delay + b.delay };
}

/** a + b in parallel; both must have the same dead time (else the sum is not of this form). */
export function tfParallel(a: TransferFunction, b: TransferFunction): TransferFunction {
	if (a.delay !== b.delay) throw new Error('tfParallel: dead times differ');
	return { num: polyAdd(polyMul(a.num, b.den), polyMul(b.num, a.den)), den: polyMul(a.den, b.den), delay: a.delay };
}

/**
 * Negative-feedback connection g/(1 + g·h) (h = 1 when omitted) of delay-free systems.
 * Throws for delayed parts: use `tfPade` first (the closed loop with a delay is not rational).
 */
export function tfFeedback(g: TransferFunction, h: TransferFunction = { num: [1], den: [1], delay: 0 }): TransferFunction {
	if (g.delay !== 0 || h.delay !== 0) throw new Error('tfFeedback: approximate the dead time first (tfPade)');
	return {
		num: polyMul(g.num, h.den),
		den: polyAdd(polyMul(g.den, h.den), polyMul(g.num, h.num)),
		delay: 0
	};
}

/** Value at s = 0, or null with the reason (a pole at the origin gives an infinite gain). */
export function tfDcGain(g: TransferFunction): { value: number | null; reason?: string } {
	const n = polyTrim(g.num);
	const d = polyTrim(g.den);
	if (n.length === 0) return { value: 0 };
	const zn = polyTrailingZeros(n);
	const zd = polyTrailingZeros(d);
	if (zd > zn) return { value: null, reason: 'pole at s = 0: the DC gain is infinite' };
	if (zn > zd) return { value: 0 };
	const v = n[n.length - 1 - zn] / d[d.length - 1 - zd];
	if (zn > 0) return { value: v, reason: 'common factor s cancelled' };
	return { value: v };
}

/** System type: free integrators (poles at s = 0) minus differentiators (zeros at s = 0). */
export function tfSystemType(g: TransferFunction): number {
	return polyTrailingZeros(g.den) - polyTrailingZeros(g.num);
}

/** Relative degree deg den − deg num (≥ 0 for proper systems; −∞ excluded: num ≠ 0 assumed). */
export function tfRelativeDegree(g: TransferFunction): number {
	return polyDegree(g.den) - polyDegree(g.num);
}

/** True when deg num ≤ deg den. */
export function tfIsProper(g: TransferFunction): boolean {
	return polyDegree(g.num) <= polyDegree(g.den);
}

/** g(s) at complex s = re + j·im, including the dead-time factor e^(−delay·s). */
export function tfEval(g: TransferFunction, re: number, im: number): Complex {
	const n = polyEvalComplex(g.num, re, im);
	const d = polyEvalComplex(g.den, re, im);
	const dd = d.re * d.re + d.im * d.im;
	let r = (n.re * d.re + n.im * d.im) / dd;
	let i = (n.im * d.re - n.re * d.im) / dd;
	if (g.delay !== 0) {
		const mag = Math.exp(-g.delay * re);
		const c = Math.cos(-g.delay * im) * mag;
		const s = Math.sin(-g.delay * im) * mag;
		const nr = r * c - i * s;
		i = r * s + i * c;
		r = nr;
	}
	return { re: r, im: i };
}

/** g(jω) (ω in rad/s), including the dead time. */
export function tfFreqResp(g: TransferFunction, w: number): Complex {
	return tfEval(g, 0, w);
}

/**
 * Cancels pole–zero pairs closer than relTol·max(1, |p|) (greedy nearest matching), dividing
 * both polynomials by the common factor. The gain and the delay are kept.
 */
export function tfMinreal(g: TransferFunction, relTol = 1e-8): TransferFunction {
	const n = polyTrim(g.num);
	const d = polyTrim(g.den);
	if (n.length <= 1 || d.length <= 1) return { num: n, den: d, delay: g.delay };
	const z = roots(n);
	const p = roots(d);
	const usedP = new Array<boolean>(p.length).fill(false);
	const common: Complex[] = [];
	for (const zi of z) {
		let best = -1;
		let bestDist = Infinity;
		for (let j = 0; j < p.length; j++) {
			if (usedP[j]) continue;
			const dist = modulus(zi.re - p[j].re, zi.im - p[j].im);
			if (dist < bestDist) {
				bestDist = dist;
				best = j;
			}
		}
		if (best >= 0 && bestDist <= relTol * Math.max(1, modulus(p[best].re, p[best].im))) {
			usedP[best] = true;
			common.push(p[best]);
		}
	}
	if (common.length === 0) return { num: n, den: d, delay: g.delay };
	const c = polyFromRoots(common);
	return { num: polyDivide(n, c).quotient, den: polyDivide(d, c).quotient, delay: g.delay };
}

/**
 * Coefficients c_k = (2n − k)!·n! / ((2n)!·k!·(n − k)!), k = 0…n, of the diagonal [n/n] Padé
 * approximant of eˣ ≈ Σc_k·xᵏ / Σc_k·(−x)ᵏ (standard formula, e.g. Golub & Van Loan, Matrix
 * Computations, 4th ed., §9.3.1, from memory; checked against scipy.interpolate.pade).
 */
export function padeCoefficients(order: number): number[] {
	const c = [1];
	for (let k = 1; k <= order; k++) c.push((c[k - 1] * (order - k + 1)) / (k * (2 * order - k + 1)));
	return c;
}

/**
 * [n/n] Padé approximant of e^(−delay·s) as num/den in descending powers of s:
 * num(s) = Σc_k(−delay·s)ᵏ, den(s) = Σc_k(delay·s)ᵏ. Delay 0 gives 1/1.
 */
export function pade(delay: number, order: number): { num: number[]; den: number[] } {
	if (delay === 0 || order === 0) return { num: [1], den: [1] };
	const c = padeCoefficients(order);
	const num = new Array<number>(order + 1);
	const den = new Array<number>(order + 1);
	let pw = 1;
	for (let k = 0; k <= order; k++) {
		// Coefficient of s^k sits at index order − k.
		num[order - k] = c[k] * pw * (k % 2 === 0 ? 1 : -1);
		den[order - k] = c[k] * pw;
		pw *= delay;
	}
	return { num, den };
}

/** Roots of the [n/n] Padé numerator of a unit delay, by order (they scale as 1/delay). */
const unitPadeZeros = new Map<number, Complex[]>();

/**
 * Zeros of the [order/order] Padé approximant of e^(−delay·s) (the roots of `pade(delay, order).num`,
 * in the right half-plane): those of the unit-delay approximant divided by the delay, computed
 * once per order.
 */
export function padeZeros(delay: number, order: number): Complex[] {
	if (delay === 0 || order === 0) return [];
	let unit = unitPadeZeros.get(order);
	if (!unit) {
		unit = roots(pade(1, order).num);
		unitPadeZeros.set(order, unit);
	}
	return unit.map((r) => ({ re: r.re / delay, im: r.im / delay }));
}

/** Delay-free rational approximation of g: the dead time replaced by its [order/order] Padé approximant. */
export function tfPade(g: TransferFunction, order: number): TransferFunction {
	if (g.delay === 0) return { num: g.num.slice(), den: g.den.slice(), delay: 0 };
	const p = pade(g.delay, order);
	return { num: polyMul(g.num, p.num), den: polyMul(g.den, p.den), delay: 0 };
}

/**
 * g(α·s) with dead time α·delay: every time constant stretched by α > 0 (time scaling).
 * The steady-state gain of a type-0 system is unchanged.
 */
export function tfScaleTime(g: TransferFunction, alpha: number): TransferFunction {
	return { num: polyScaleArgument(g.num, alpha), den: polyScaleArgument(g.den, alpha), delay: g.delay * alpha };
}

/** k·g. */
export function tfScale(g: TransferFunction, k: number): TransferFunction {
	return { num: polyScale(g.num, k), den: g.den.slice(), delay: g.delay };
}
