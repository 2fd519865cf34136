/**
 * The closed loop of a plant G(s)·e^(−θs) and a controller (feedback path C, set-point path Cr):
 * closed-loop polynomials, poles and zeros, stability (with a Routh–Hurwitz cross-check),
 * dominant pole pair, error constants and steady-state errors by the final value theorem.
 *
 * Dead time: the closed loop of a delayed plant is not rational. Poles, zeros, the reported
 * num/den and the stability flag use the [n/n] Padé approximant of e^(−θs) (n = padeOrder,
 * default 5) — an approximation, flagged as `approximation: 'pade'`. Steady-state values do not
 * depend on it (the Padé approximant is exactly 1 at s = 0). Time responses and frequency
 * responses elsewhere use the exact delay.
 */
import type { Complex, TransferFunction } from './types';
import type { ControllerTerms } from './controller';
import { controllerPolynomials } from './controller';
import { AnalysisInputError } from './errors';
import { polyAdd, polyDegree, polyMaxAbs, polyMul, polySub, polyTrailingZeros, polyTrim } from './polynomial';
import { roots, sortRoots } from './roots';
import { pade, padeZeros } from './transfer-function';
import { modulus } from './complex';

/** θ·|p|max below which a dead time is neglected for closed-loop poles (|p|max: Fujiwara's bound on the delay-free poles). */
export const NEGLIGIBLE_DELAY = 1e-6;

/** Default order of the Padé approximant used for closed-loop poles of delayed loops. */
export const DEFAULT_PADE_ORDER = 5;

/** Delay-free closed-loop polynomials (descending powers of s). */
export interface ClosedLoopPolynomials {
	/** Characteristic polynomial dc·dg + nc·ng·(Padé num), Padé den folded in for delayed loops. */
	char: number[];
	/** Set-point → PV numerator nr·ng (× Padé num). */
	ry: number[];
	/** Set-point → MV numerator nr·dg (× Padé den). */
	ru: number[];
	/** Load disturbance at the plant input → PV numerator ng·dc (× Padé num). */
	dy: number[];
	/** Load disturbance at the plant input → MV numerator −nc·ng (× Padé num). */
	du: number[];
	/** Loop L = C·G numerator nc·ng and denominator dc·dg (without the delay). */
	loopNum: number[];
	loopDen: number[];
}

/**
 * Closed-loop polynomials for plant num/den (delay applied with the given Padé order, 0 = ignore
 * the delay) and controller terms. With u = Cr·r − C·y and y = G·(u + d):
 * y/r = Cr·G/(1 + C·G), u/r = Cr/(1 + C·G), y/d = G/(1 + C·G), u/d = −C·G/(1 + C·G).
 */
export function closedLoopPolynomials(plant: TransferFunction, terms: ControllerTerms, padeOrder = 0): ClosedLoopPolynomials {
	const { nc, nr, dc } = controllerPolynomials(terms);
	const ng = plant.num;
	const dg = plant.den;
	const p = padeOrder > 0 && plant.delay > 0 ? pade(plant.delay, padeOrder) : { num: [1], den: [1] };
	const loopNum = polyMul(nc, ng);
	const loopDen = polyMul(dc, dg);
	const char = polyAdd(polyMul(loopDen, p.den), polyMul(loopNum, p.num));
	return {
		char,
		ry: polyMul(polyMul(nr, ng), p.num),
		ru: polyMul(polyMul(nr, dg), p.den),
		dy: polyMul(polyMul(ng, dc), p.num),
		du: polyMul(polyMul(nc, ng), p.num).map((c) => -c),
		loopNum,
		loopDen
	};
}

/**
 * Upper bound on the magnitude of every root of p: 2·max(|a1/a0|, |a2/a0|^(1/2), …,
 * |an/(2·a0)|^(1/n)) (Fujiwara's bound, 1916; as in Marden, Geometry of Polynomials, 1966, from
 * memory). 0 for constants.
 */
export function rootMagnitudeBound(p: readonly number[]): number {
	const a = polyTrim(p);
	const n = a.length - 1;
	let m = 0;
	for (let k = 1; k <= n; k++) {
		const c = Math.abs(a[k] / a[0]) / (k === n ? 2 : 1);
		if (c > 0) m = Math.max(m, Math.pow(c, 1 / k));
	}
	return 2 * m;
}

/** Routh–Hurwitz test result: sign changes in the first column = roots in the open RHP. */
export interface RouthResult {
	rhpCount: number;
	/** A whole row vanished: roots symmetric about the origin (possibly on the imaginary axis). */
	zeroRow: boolean;
	firstColumn: number[];
}

/**
 * Routh array of p (Routh 1877; Hurwitz 1895; as in Ogata, Modern Control Engineering, §5-6):
 * sign changes of the first column, with a vanishing first element replaced by ε → 0⁺ and a
 * vanishing row replaced by the derivative of the auxiliary polynomial. Zero tests are relative
 * (1e-12 of the row above).
 */
export function routhHurwitz(p: readonly number[]): RouthResult {
	let a = polyTrim(p);
	if (a.length === 0) return { rhpCount: 0, zeroRow: false, firstColumn: [] };
	if (a[0] < 0) a = a.map((c) => -c);
	const n = a.length - 1;
	const width = Math.floor(n / 2) + 1;
	let prev = new Array<number>(width).fill(0);
	let cur = new Array<number>(width).fill(0);
	for (let i = 0; i <= n; i += 2) prev[i / 2] = a[i];
	for (let i = 1; i <= n; i += 2) cur[(i - 1) / 2] = a[i];
	const first = [prev[0]];
	let zeroRow = false;
	const scale = polyMaxAbs(a);
	for (let row = 1; row <= n; row++) {
		const rowScale = Math.max(...prev.map(Math.abs), ...cur.map(Math.abs), 1e-300);
		if (cur.every((v) => Math.abs(v) <= 1e-12 * rowScale)) {
			// Auxiliary polynomial from the previous row (power n − row + 1, stepping by 2).
			zeroRow = true;
			const power = n - row + 1;
			cur = prev.map((v, k) => v * (power - 2 * k)).map((v, k) => (power - 2 * k > 0 ? v : 0));
		}
		if (Math.abs(cur[0]) <= 1e-12 * rowScale) cur[0] = 1e-9 * Math.max(rowScale, scale * 1e-300);
		first.push(cur[0]);
		const next = new Array<number>(width).fill(0);
		for (let k = 0; k < width - 1; k++) next[k] = (cur[0] * prev[k + 1] - prev[0] * cur[k + 1]) / cur[0];
		prev = cur;
		cur = next;
	}
	let changes = 0;
	for (let i = 1; i < first.length; i++) if (first[i] > 0 !== first[i - 1] > 0) changes++;
	return { rhpCount: changes, zeroRow, firstColumn: first };
}

/** Damping ratio, natural and damped frequency (rad/s) of a complex pole. */
export interface DominantPair {
	zeta: number;
	wn: number;
	wd: number;
}

/**
 * The dominant (rightmost) closed-loop pole: if it is one of a complex pair, its ζ = −Re/|p|,
 * ωn = |p|, ωd = |Im p| (standard second-order relations, e.g. Ogata §5-3); null when the
 * rightmost pole is real (or there are no poles).
 */
export function dominantPair(poles: readonly Complex[]): DominantPair | null {
	if (poles.length === 0) return null;
	let best = poles[0];
	for (const p of poles) if (p.re > best.re || (p.re === best.re && Math.abs(p.im) > Math.abs(best.im))) best = p;
	if (best.im === 0) return null;
	const wn = modulus(best.re, best.im);
	return { zeta: -best.re / wn, wn, wd: Math.abs(best.im) };
}

/** Where closed-loop poles lie: strictly left, on the imaginary axis (|Re p| ≤ 1e-10·|p|), right. */
export function classifyPoles(poles: readonly Complex[]): { lhp: number; axis: number; rhp: number } {
	let lhp = 0;
	let axis = 0;
	let rhp = 0;
	for (const p of poles) {
		const tol = 1e-10 * modulus(p.re, p.im);
		if (p.re < -tol) lhp++;
		else if (p.re > tol) rhp++;
		else axis++;
	}
	return { lhp, axis, rhp };
}

/** Error constants of the loop L = C·G: type, Kp = lim L, Kv = lim s·L, Ka = lim s²·L (null = infinite). */
export interface ErrorConstants {
	systemType: number;
	kp: number | null;
	kv: number | null;
	ka: number | null;
}

/**
 * Error constants of L = loopNum/loopDen at s → 0 (Ogata, Modern Control Engineering, §5-8):
 * for a type-N loop the limit of sᵏ·L is infinite (null) for k < N, finite for k = N and 0 for
 * k > N.
 */
export function errorConstants(loopNum: readonly number[], loopDen: readonly number[]): ErrorConstants {
	const n = polyTrim(loopNum);
	const d = polyTrim(loopDen);
	const zn = polyTrailingZeros(n);
	const zd = polyTrailingZeros(d);
	const type = zd - zn;
	const ratio = n[n.length - 1 - zn] / d[d.length - 1 - zd];
	const limit = (k: number): number | null => (k < type ? null : k === type ? ratio : 0);
	return { systemType: type, kp: limit(0), kv: limit(1), ka: limit(2) };
}

/** Steady-state error to a unit step, ramp and parabola of the set-point (null = grows without bound). */
export interface SteadyStateErrors {
	step: number | null;
	ramp: number | null;
	parabola: number | null;
}

/**
 * Steady-state errors e = r − y by the final value theorem on E/R = 1 − y/r = (char − ry)/char
 * (valid only for a stable loop): for R = 1/s^(k+1), e∞ = lim (char − ry)/(sᵏ·char). Exact with
 * set-point weights (b ≠ 1 changes the ramp error). Coefficients below 1e-12 of the largest
 * count as zero (they are rounding residue of exact cancellations).
 */
export function steadyStateErrors(char: readonly number[], ry: readonly number[]): SteadyStateErrors {
	const e = polySub(char, ry);
	const scale = Math.max(polyMaxAbs(char), polyMaxAbs(ry));
	const c0 = char[char.length - 1];
	const coef = (k: number) => (k < e.length ? e[e.length - 1 - k] : 0);
	let lowest = 0;
	while (lowest < e.length && Math.abs(coef(lowest)) <= 1e-12 * scale) lowest++;
	const value = (k: number): number | null => {
		if (lowest >= e.length) return 0;
		if (k < lowest) return 0;
		if (k === lowest) return coef(k) / c0;
		return null;
	};
	return { step: value(0), ramp: value(1), parabola: value(2) };
}

/** Closed-loop report (set-point → PV) with stability and the Routh cross-check. */
export interface ClosedLoopReport {
	/** Set-point → PV numerator and denominator; den monic. Padé-approximated for delayed loops. */
	num: number[];
	den: number[];
	poles: Complex[];
	zeros: Complex[];
	stable: boolean;
	approximation: 'exact' | 'pade';
	padeOrder: number | null;
	routh: { rhpCount: number; zeroRow: boolean; agrees: boolean };
	poleCounts: { lhp: number; axis: number; rhp: number };
	dominant: DominantPair | null;
	/** Why `stable` is false, when it is. */
	instability: string | null;
	polys: ClosedLoopPolynomials;
	/** Delay-free closed-loop polynomials (exact steady state). */
	exact: ClosedLoopPolynomials;
	warnings: string[];
}

/**
 * Closed-loop analysis. Throws AnalysisInputError when the loop is ill-posed (1 + L(∞) = 0) or
 * improper (an ideal derivative on a plant with direct feedthrough). For delayed loops whose
 * loop gain stays ≥ 1 at infinite frequency (a "neutral" loop: biproper L with |L(∞)| ≥ 1),
 * the closed loop is unstable for any dead time (chains of roots with Re s ≥ 0; Hale &
 * Verduyn Lunel, Introduction to Functional Differential Equations, 1993, ch. 9, from memory):
 * reported unstable whatever the Padé poles say.
 */
export function analyzeClosedLoop(plant: TransferFunction, terms: ControllerTerms, padeOrder = DEFAULT_PADE_ORDER): ClosedLoopReport {
	const warnings: string[] = [];
	const exact = closedLoopPolynomials(plant, terms, 0);
	const dL = polyDegree(exact.loopDen);
	const nL = polyDegree(exact.loopNum);
	if (nL > dL)
		throw new AnalysisInputError('controller.n', 'The loop C·G is improper (an ideal derivative on a plant with as many zeros as poles): set a derivative filter n.');
	if (polyDegree(exact.char) < dL)
		throw new AnalysisInputError('controller.kp', 'The loop is ill-posed: 1 + C(∞)·G(∞) = 0, so the closed loop has no proper solution.');
	let delayed = plant.delay > 0;
	if (delayed) {
		// A dead time far below every time scale of the loop would only add Padé poles near
		// −2n/θ and coefficients outside the floating-point range: neglect it for the poles
		// (θ·|p|max < 1e-6, with |p|max bounded from the delay-free characteristic polynomial).
		if (plant.delay * rootMagnitudeBound(exact.char) < NEGLIGIBLE_DELAY) {
			delayed = false;
			warnings.push(`The dead time (${plant.delay.toPrecision(3)} s) is negligible against the closed-loop time scales (θ·|p|max < ${NEGLIGIBLE_DELAY}); poles and zeros are those of the delay-free loop.`);
		}
	}
	const polys = delayed ? closedLoopPolynomials(plant, terms, padeOrder) : exact;
	const lead = polys.char[0];
	const den = polys.char.map((c) => c / lead);
	const num = polys.ry.map((c) => c / lead);
	const poles = roots(polys.char);
	// Zeros of ry = nr·ng(·Padé numerator): the union of the factors' roots (cheaper and more
	// accurate than the roots of the product).
	const { nr } = controllerPolynomials(terms);
	const zeros = sortRoots([...roots(nr), ...roots(plant.num), ...(delayed ? padeZeros(plant.delay, padeOrder) : [])]);
	const counts = classifyPoles(poles);
	const routh = routhHurwitz(polys.char);
	let stable = counts.rhp === 0 && counts.axis === 0;
	let instability: string | null = null;
	if (counts.rhp > 0) instability = `${counts.rhp} closed-loop pole(s) in the right half-plane`;
	else if (counts.axis > 0) instability = 'closed-loop pole(s) on the imaginary axis (marginally stable)';
	const routhStable = routh.rhpCount === 0 && !routh.zeroRow;
	const agrees = routhStable === stable && (stable || routh.rhpCount === counts.rhp || routh.zeroRow);
	if (!agrees)
		warnings.push(
			`The Routh–Hurwitz test (${routh.rhpCount} sign change(s)${routh.zeroRow ? ', a vanishing row' : ''}) disagrees with the computed poles (${counts.rhp} in the right half-plane, ${counts.axis} on the axis); the loop is close to the stability boundary or badly scaled.`
		);
	if (delayed && nL === dL) {
		const lInf = Math.abs(exact.loopNum[0] / exact.loopDen[0]);
		if (lInf >= 1) {
			stable = false;
			instability = `the loop gain at infinite frequency |L(∞)| = ${lInf.toPrecision(4)} ≥ 1 with dead time: a neutral loop with infinitely many unstable roots`;
		} else warnings.push(`The loop has direct feedthrough at high frequency (|L(∞)| = ${lInf.toPrecision(4)}) with dead time; a chain of fast, decaying closed-loop roots is not shown by the Padé approximation.`);
	}
	if (delayed)
		warnings.push(`Closed-loop poles, zeros and the stability flag use a [${padeOrder}/${padeOrder}] Padé approximation of the dead time; time and frequency responses use the exact dead time.`);
	return {
		num,
		den,
		poles,
		zeros,
		stable,
		approximation: delayed ? 'pade' : 'exact',
		padeOrder: delayed ? padeOrder : null,
		routh: { rhpCount: routh.rhpCount, zeroRow: routh.zeroRow, agrees },
		poleCounts: counts,
		dominant: dominantPair(poles),
		instability,
		polys,
		exact,
		warnings
	};
}
