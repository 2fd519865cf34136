/**
 * Frequency response of a loop L(s) = k·Π(s − zᵢ)/Π(s − pᵢ)·e^(−θs) (rad/s, dB, degrees):
 * Bode magnitude and continuous (unwrapped) phase with the exact delay phase −ωθ, an automatic
 * log-spaced grid, gain and phase margins with all crossings, delay margin and the maximum
 * sensitivity Ms = max|1/(1 + L(jω))|.
 *
 * Magnitude and phase are sums over the factors (jω − r): the phase of each factor is continuous
 * in ω, so the total phase needs no unwrapping and no overflow can occur at high order.
 */
import type { Complex } from './types';
import { polyTrim } from './polynomial';
import { roots } from './roots';
import { brentMinimize, newtonBracketed } from './solvers';
import { modulus } from './complex';
import { SLOT, scratch } from './workspace';

/** A loop in factored form, ready for fast evaluation on the imaginary axis. */
export interface LoopModel {
	gain: number;
	zeros: Complex[];
	poles: Complex[];
	delay: number;
	/** deg den − deg num. */
	relativeDegree: number;
	/** Free integrators minus zeros at the origin. */
	systemType: number;
	/** Constant 2πk added to the phase so the low-frequency phase lies in (−315°, 45°]. */
	phaseOffset: number;
	/** Characteristic frequencies (rad/s): |r| of non-zero roots, 1/θ, or the crossover estimate. */
	corners: number[];
	zr: Float64Array;
	zi: Float64Array;
	pr: Float64Array;
	pi: Float64Array;
	/**
	 * Factors with a root strictly in the left half-plane, paired for the phase: entry k holds
	 * (Re r, Im r, sign) of two roots at 6k…6k+5, sign +1 for a zero and −1 for a pole. Each such
	 * factor jω − r has a phase in (−π/2, π/2), so the sum (or difference) of two lies in (−π, π)
	 * and one atan2 of their product gives it exactly, with no unwrapping.
	 */
	pairs: Float64Array;
	/** Factors evaluated one by one (roots on the axis or in the right half-plane, and an odd one out): (Re r, Im r, sign). */
	singles: Float64Array;
	/** Zeros minus poles at the origin: each contributes ±90° for ω > 0 (no atan2 needed). */
	originCount: number;
}

/** Factored loop model of num/den·e^(−delay·s) (num, den not zero). */
export function loopModel(num: readonly number[], den: readonly number[], delay = 0): LoopModel {
	const n = polyTrim(num);
	const d = polyTrim(den);
	if (n.length === 0 || d.length === 0) throw new Error('loopModel: zero numerator or denominator');
	return loopModelFromFactors(n[0] / d[0], roots(n), roots(d), delay);
}

/**
 * Loop model k·Π(s − zᵢ)/Π(s − pᵢ)·e^(−delay·s) from its factors (e.g. the union of controller
 * and plant roots, which is cheaper and more accurate than the roots of the product).
 */
export function loopModelFromFactors(gain: number, zeros: Complex[], poles: Complex[], delay = 0): LoopModel {
	const corners: number[] = [];
	for (const r of [...zeros, ...poles]) {
		const m = modulus(r.re, r.im);
		if (m > 0) corners.push(m);
	}
	if (delay > 0) corners.push(1 / delay);
	const relativeDegree = poles.length - zeros.length;
	if (corners.length === 0) corners.push(relativeDegree > 0 ? Math.pow(Math.abs(gain), 1 / relativeDegree) : 1);
	const atOrigin = (rs: Complex[]) => rs.filter((r) => r.re === 0 && r.im === 0).length;
	const model: LoopModel = {
		gain,
		zeros,
		poles,
		delay,
		relativeDegree,
		systemType: atOrigin(poles) - atOrigin(zeros),
		phaseOffset: 0,
		corners,
		zr: Float64Array.from(zeros.map((z) => z.re)),
		zi: Float64Array.from(zeros.map((z) => z.im)),
		pr: Float64Array.from(poles.map((z) => z.re)),
		pi: Float64Array.from(poles.map((z) => z.im)),
		...pairFactors(zeros, poles)
	};
	const wLow = Math.min(...corners) * 1e-3;
	const raw = loopPhase(model, wLow);
	const k = Math.ceil((raw - Math.PI / 4) / (2 * Math.PI));
	model.phaseOffset = -2 * Math.PI * k;
	return model;
}

/** Splits the factors into left-half-plane pairs and singles (see `LoopModel.pairs`). */
function pairFactors(zeros: readonly Complex[], poles: readonly Complex[]): { pairs: Float64Array; singles: Float64Array; originCount: number } {
	const lhp: number[] = [];
	const single: number[] = [];
	let originCount = 0;
	const add = (r: Complex, sign: number) => {
		if (r.re === 0 && r.im === 0) originCount += sign;
		else (r.re < 0 ? lhp : single).push(r.re, r.im, sign);
	};
	for (const z of zeros) add(z, 1);
	for (const p of poles) add(p, -1);
	const even = lhp.length - (lhp.length % 6);
	single.push(...lhp.slice(even));
	return { pairs: Float64Array.from(lhp.slice(0, even)), singles: Float64Array.from(single), originCount };
}

/** Products of squared factor moduli are folded into a logarithm before they leave this range. */
const PRODUCT_CAP = 1e150;

/** Natural log of |L(jω)|, clamped to ±700 (a root exactly on the axis gives the clamp). */
export function loopLogMagnitude(m: LoopModel, w: number): number {
	// Σ ± ½·log|jω − r|² as logarithms of running products (one log per several factors); a
	// product is folded into the sum before it could overflow or underflow.
	let acc = Math.log(Math.abs(m.gain));
	let num = 1;
	let den = 1;
	const { zr, zi, pr, pi } = m;
	for (let i = 0; i < zr.length; i++) {
		const a = w - zi[i];
		const q = a * a + zr[i] * zr[i];
		if (q > PRODUCT_CAP || q < 1 / PRODUCT_CAP || num > PRODUCT_CAP || num < 1 / PRODUCT_CAP) {
			acc += 0.5 * Math.log(num);
			num = q;
		} else num *= q;
	}
	for (let i = 0; i < pr.length; i++) {
		const a = w - pi[i];
		const q = a * a + pr[i] * pr[i];
		if (q > PRODUCT_CAP || q < 1 / PRODUCT_CAP || den > PRODUCT_CAP || den < 1 / PRODUCT_CAP) {
			acc -= 0.5 * Math.log(den);
			den = q;
		} else den *= q;
	}
	// One logarithm of the ratio: where it overflows or underflows, |log| > 709 lies beyond the
	// ±700 clamp below anyway (and 0/0, two roots on the axis, gives NaN → the clamp, as before).
	acc += 0.5 * Math.log(num / den);
	if (!(acc < 700)) return acc > 0 || Number.isNaN(acc) ? 700 : -700;
	if (!(acc > -700)) return -700;
	return acc;
}

/** Continuous phase of L(jω) in radians, including −ωθ and the model's 2πk offset. */
export function loopPhase(m: LoopModel, w: number): number {
	let acc = m.gain < 0 ? Math.PI : 0;
	const { pairs, singles, originCount } = m;
	// A root at the origin: the factor jω has phase 90° for ω > 0 (atan2(ω, −0) otherwise, as for the others).
	if (originCount !== 0) acc += originCount * (w > 0 ? Math.PI / 2 : Math.atan2(w, -0));
	for (let i = 0; i < pairs.length; i += 6) {
		// (x1 + j·y1)·(x2 + j·y2), the second conjugated when the two signs differ.
		const x1 = -pairs[i];
		const y1 = w - pairs[i + 1];
		const s1 = pairs[i + 2];
		const x2 = -pairs[i + 3];
		const y2 = s1 * pairs[i + 5] * (w - pairs[i + 4]);
		acc += s1 * Math.atan2(x1 * y2 + x2 * y1, x1 * x2 - y1 * y2);
	}
	for (let i = 0; i < singles.length; i += 3) {
		const re = singles[i];
		// A right-half-plane root: the factor −Re r + j(ω − Im r) crosses the negative real axis at
		// ω = Im r, where atan2 would jump by 2π; π − atan2(ω − Im r, Re r) is the continuous branch
		// (equal to atan2 for a real root at ω ≥ 0).
		acc += singles[i + 2] * (re > 0 ? Math.PI - Math.atan2(w - singles[i + 1], re) : Math.atan2(w - singles[i + 1], -re));
	}
	return acc - w * m.delay + m.phaseOffset;
}

/**
 * d(log|L|)/d(log ω) and d∠L/d(log ω) at ω: sums over the factors of (ω − Im r)·ω/|jω − r|² and
 * −Re r·ω/|jω − r|² (zeros +, poles −), minus ωθ for the phase. Used for Newton refinement.
 */
export function loopSlopes(m: LoopModel, w: number): { dLogMag: number; dPhase: number } {
	let dm = 0;
	let dp = 0;
	const { zr, zi, pr, pi } = m;
	for (let i = 0; i < zr.length; i++) {
		const a = w - zi[i];
		const d = a * a + zr[i] * zr[i];
		if (d === 0) continue;
		dm += a / d;
		dp += -zr[i] / d;
	}
	for (let i = 0; i < pr.length; i++) {
		const a = w - pi[i];
		const d = a * a + pr[i] * pr[i];
		if (d === 0) continue;
		dm -= a / d;
		dp -= -pr[i] / d;
	}
	return { dLogMag: dm * w, dPhase: (dp - m.delay) * w };
}

/** L(jω) as a complex number (magnitude clamped to e^±300 to stay finite). */
export function loopValue(m: LoopModel, w: number): Complex {
	const lm = Math.max(-300, Math.min(300, loopLogMagnitude(m, w)));
	const ph = loopPhase(m, w);
	const mag = Math.exp(lm);
	return { re: mag * Math.cos(ph), im: mag * Math.sin(ph) };
}

/** Options of the automatic frequency grid. */
export interface GridOptions {
	points?: number;
	wMin?: number;
	wMax?: number;
}

/**
 * Frequency band (rad/s) of the automatic grid: from two decades below the lowest corner
 * (|roots|, 1/θ) to two decades above the highest (at most 12 decades wide), extended upwards
 * until |L| < 0.5 for strictly proper loops so every gain crossover lies inside.
 */
export function frequencyRange(m: LoopModel, opts: GridOptions = {}): { wMin: number; wMax: number } {
	// Two decades of margin above the highest corner (root corners and the dead-time corner 1/θ).
	const rootCorners = m.corners.filter((c) => !(m.delay > 0 && c === 1 / m.delay));
	// Decades are rounded with a 1e-9 tolerance, so a corner one rounding error off a power of ten
	// (a computed triple root at −0.9999999999999998) gives the same band as the exact value.
	const decadeUp = (x: number) => Math.ceil(Math.log10(x) - 1e-9);
	const decadeDown = (x: number) => Math.floor(Math.log10(x) + 1e-9);
	const top = Math.max(
		rootCorners.length ? Math.pow(10, decadeUp(Math.max(...rootCorners)) + 2) : 0,
		m.delay > 0 ? Math.pow(10, decadeUp(1 / m.delay) + 2) : 0
	);
	let wMin = opts.wMin ?? Math.pow(10, decadeDown(Math.min(...m.corners)) - 2);
	// At most 12 decades (a negligible dead time would otherwise push the band to 1/θ).
	let wMax = opts.wMax ?? Math.min(top, wMin * 1e12);
	if (opts.wMax === undefined && m.relativeDegree > 0) {
		for (let i = 0; i < 8 && loopLogMagnitude(m, wMax) > Math.log(0.5) && wMax < wMin * 1e16; i++) wMax *= 10;
	}
	if (opts.wMin === undefined && m.systemType < 0) {
		for (let i = 0; i < 8 && loopLogMagnitude(m, wMin) > Math.log(0.5); i++) wMin /= 10;
	}
	if (!(wMax > wMin)) wMax = wMin * 1e4;
	return { wMin, wMax };
}

/** `points` log-spaced frequencies between wMin and wMax inclusive. */
export function logspace(wMin: number, wMax: number, points: number): Float64Array {
	const out = new Float64Array(points);
	const a = Math.log(wMin);
	const b = Math.log(wMax);
	const step = (b - a) / Math.max(1, points - 1);
	// Successive points by the constant ratio, re-anchored by an exponential every 16 points (a
	// few ulp of drift at most, and a sixteenth of the exponentials).
	const ratio = Math.exp(step);
	for (let i = 0; i < points; i++) out[i] = i % 16 === 0 ? Math.exp(a + step * i) : out[i - 1] * ratio;
	return out;
}

/**
 * The analysis grid: the display grid plus points packed around lightly damped roots
 * (|Re r| < 0.3·|r|), spaced |Re r|/2 near ω = |Im r|, so no crossing pair or resonance peak
 * falls between two grid points.
 */
export function analysisGrid(m: LoopModel, display: Float64Array): Float64Array {
	const extra: number[] = [];
	const lo = display[0];
	const hi = display[display.length - 1];
	const consider = (re: number, im: number) => {
		if (im <= 0) return;
		const mag = modulus(re, im);
		if (Math.abs(re) >= 0.3 * mag) return;
		const step = Math.max(Math.abs(re) / 2, 1e-6 * im);
		for (let k = -8; k <= 8; k++) {
			const w = im + k * step;
			if (w > lo && w < hi) extra.push(w);
		}
	};
	for (const z of m.zeros) consider(z.re, z.im);
	for (const p of m.poles) consider(p.re, p.im);
	if (extra.length === 0) return display;
	const all = Float64Array.from([...display, ...extra]);
	all.sort();
	return all;
}

/** log|L| and the continuous phase (rad) of the loop on a frequency grid. */
export interface GridValues {
	lm: Float64Array;
	ph: Float64Array;
}

/** Evaluates log|L(jω)| and ∠L(jω) once on a grid, for reuse by Bode, crossings and Ms. */
export function evaluateLoop(m: LoopModel, grid: ArrayLike<number>): GridValues {
	const n = grid.length;
	const lm = new Float64Array(n);
	const ph = new Float64Array(n);
	const { zr, zi, pr, pi } = m;
	const factors = zr.length + pi.length;
	const logGain = Math.log(Math.abs(m.gain));
	// At each point the products N = Π(jω − z) and D = Π(jω − p) give the magnitude, one logarithm
	// of |N|²/|D|². Along an increasing grid the phase of the rational part is carried from one
	// point to the next by the angle between N·conj(D) at the two points: one atan2 per point
	// instead of one per pair of factors. The step is unambiguous when the phase cannot turn by π
	// between the points; each factor turns by at most Δω/d (d its root's distance from the
	// segment [jω₀, jω₁]), so factors·Δω < min d is required. Otherwise (near a lightly damped or
	// axis root, at the first point, or when a product leaves a safe range) the point is evaluated
	// factor by factor.
	let prevRe = 0;
	let prevIm = 0;
	let prevRational = 0;
	let prevOk = false;
	for (let i = 0; i < n; i++) {
		const w = grid[i];
		const w0 = i > 0 ? grid[i - 1] : w;
		let nRe = 1;
		let nIm = 0;
		let dRe = 1;
		let dIm = 0;
		let dMin = Infinity;
		// side 0: the zeros into N; side 1: the poles into D.
		for (let side = 0; side < 2; side++) {
			const rr = side === 0 ? zr : pr;
			const ri = side === 0 ? zi : pi;
			let pRe = 1;
			let pIm = 0;
			for (let k = 0; k < rr.length; k++) {
				const a = rr[k];
				const b = ri[k];
				// jω − r = −a + j(ω − b); a root at the origin gives jω, whose phase stays 90° for ω > 0.
				const x = -a;
				const y = w - b;
				const t = pRe * x - pIm * y;
				pIm = pRe * y + pIm * x;
				pRe = t;
				if (a === 0 && b === 0) continue;
				const d = Math.max(Math.abs(a), b < w0 ? w0 - b : b > w ? b - w : 0);
				if (d < dMin) dMin = d;
			}
			if (side === 0) {
				nRe = pRe;
				nIm = pIm;
			} else {
				dRe = pRe;
				dIm = pIm;
			}
		}
		const nSize = Math.abs(nRe) + Math.abs(nIm);
		const dSize = Math.abs(dRe) + Math.abs(dIm);
		// Squares of the products stay finite and normal inside 1e±140.
		const ok = nSize > 1e-140 && nSize < 1e140 && dSize > 1e-140 && dSize < 1e140;
		// Direction of N·conj(D): the phase of the rational part.
		const re = nRe * dRe + nIm * dIm;
		const im = nIm * dRe - nRe * dIm;
		if (ok) {
			const acc = logGain + 0.5 * Math.log((nRe * nRe + nIm * nIm) / (dRe * dRe + dIm * dIm));
			lm[i] = acc < 700 ? (acc > -700 ? acc : -700) : 700;
		} else lm[i] = loopLogMagnitude(m, w);
		// Phase of L minus the carried part: the gain's sign, the origin roots' constant ±90° (their
		// factors jω are in N and D but never change the step), dead time, offset.
		const rest = (m.gain < 0 ? Math.PI : 0) + m.originCount * (w > 0 ? Math.PI / 2 : Math.atan2(w, -0)) - w * m.delay + m.phaseOffset;
		let rational: number;
		if (ok && prevOk && w > w0 && w0 > 0 && factors * (w - w0) < dMin) {
			rational = prevRational + Math.atan2(im * prevRe - re * prevIm, re * prevRe + im * prevIm);
			ph[i] = rational + rest;
		} else {
			ph[i] = loopPhase(m, w);
			rational = ph[i] - rest;
		}
		prevRe = re;
		prevIm = im;
		prevRational = rational;
		prevOk = ok;
	}
	return { lm, ph };
}

/** Bode data: ω (rad/s), |L| in dB, continuous phase in degrees. */
export interface BodeData {
	w: number[];
	magDb: number[];
	phaseDeg: number[];
}

/** Bode magnitude (dB) and phase (degrees, unwrapped, exact delay phase) on the grid w. */
export function bode(m: LoopModel, w: ArrayLike<number>, values?: GridValues): BodeData {
	const v = values ?? evaluateLoop(m, w);
	const n = w.length;
	const out: BodeData = { w: new Array(n), magDb: new Array(n), phaseDeg: new Array(n) };
	const toDb = 20 / Math.LN10;
	const toDeg = 180 / Math.PI;
	for (let i = 0; i < n; i++) {
		out.w[i] = w[i];
		out.magDb[i] = toDb * v.lm[i];
		out.phaseDeg[i] = toDeg * v.ph[i];
	}
	return out;
}

/** A phase crossover (∠L = −180° mod 360°) and the gain margin there. */
export interface PhaseCrossing {
	w: number;
	gainMargin: number;
	gainMarginDb: number;
}

/** A gain crossover (|L| = 1) and the phase margin there (degrees, in (−180, 180]). */
export interface GainCrossing {
	w: number;
	phaseMargin: number;
}

/** Stability margins; nulls carry a reason in `reasons` keyed by field name. */
export interface Margins {
	gainMargin: number | null;
	gainMarginDb: number | null;
	phaseCrossover: number | null;
	phaseMargin: number | null;
	gainCrossover: number | null;
	delayMargin: number | null;
	ms: number | null;
	msFrequency: number | null;
	phaseCrossings: PhaseCrossing[];
	gainCrossings: GainCrossing[];
	reasons: Record<string, string>;
}

const wrapPi = (x: number) => {
	let y = x % (2 * Math.PI);
	if (y <= -Math.PI) y += 2 * Math.PI;
	if (y > Math.PI) y -= 2 * Math.PI;
	return y;
};

/** Phase crossovers kept at most (a dead time gives infinitely many, with growing gain margins). */
export const MAX_PHASE_CROSSINGS = 100;
/** log|L| below which phase crossovers are not sought (gain margin above 120 dB). */
const PHASE_CROSSING_FLOOR = Math.log(1e-6);

/**
 * All phase crossovers (∠L(jω) = −180° mod 360°; the first MAX_PHASE_CROSSINGS in frequency, and
 * only where |L| ≥ 1e-6, i.e. gain margins up to 120 dB) and gain crossovers (|L(jω)| = 1) on the
 * analysis grid, each bracketed on the grid and refined in log ω by Newton's method with the
 * analytic slopes of `loopSlopes`, safeguarded by bisection.
 */
export function findCrossings(m: LoopModel, grid: ArrayLike<number>, values?: GridValues): { phase: PhaseCrossing[]; gain: GainCrossing[] } {
	const n = grid.length;
	const { lm, ph } = values ?? evaluateLoop(m, grid);
	const phase: PhaseCrossing[] = [];
	const gain: GainCrossing[] = [];
	const toDb = 20 / Math.LN10;
	for (let i = 0; i < n - 1; i++) {
		// Gain crossover: log|L| changes sign.
		if ((lm[i] > 0) !== (lm[i + 1] > 0) && lm[i] !== lm[i + 1]) {
			const a = Math.log(grid[i]);
			const b = Math.log(grid[i + 1]);
			const x = newtonBracketed((x) => {
				const w = Math.exp(x);
				return [loopLogMagnitude(m, w), loopSlopes(m, w).dLogMag];
			}, a, b, 1e-15);
			if (x !== null) {
				const w = Math.exp(x);
				gain.push({ w, phaseMargin: (180 / Math.PI) * wrapPi(loopPhase(m, w) + Math.PI) });
			}
		}
		// Phase crossover: (φ + π)/2π passes an integer. Where |L| < 1e-6 on the whole interval
		// the gain margin exceeds 120 dB: such crossings are not sought.
		if (lm[i] < PHASE_CROSSING_FLOOR && lm[i + 1] < PHASE_CROSSING_FLOOR) continue;
		const u0 = (ph[i] + Math.PI) / (2 * Math.PI);
		const u1 = (ph[i + 1] + Math.PI) / (2 * Math.PI);
		const lo = Math.min(u0, u1);
		const hi = Math.max(u0, u1);
		if (Math.floor(lo) + 1 > Math.floor(hi)) continue;
		const a = Math.log(grid[i]);
		const b = Math.log(grid[i + 1]);
		for (let k = Math.floor(lo) + 1; k <= Math.floor(hi) && phase.length < MAX_PHASE_CROSSINGS; k++) {
			if (k === lo) continue;
			const target = 2 * Math.PI * k - Math.PI;
			const x = newtonBracketed((x) => {
				const w = Math.exp(x);
				return [loopPhase(m, w) - target, loopSlopes(m, w).dPhase];
			}, a, b, 1e-15);
			if (x === null) continue;
			const w = Math.exp(x);
			// A jump of the phase (a root on the imaginary axis) is not a crossing.
			if (Math.abs(loopPhase(m, w) - target) > 1e-6) continue;
			const l = loopLogMagnitude(m, w);
			if (Math.abs(l) >= 700) continue;
			phase.push({ w, gainMargin: Math.exp(-l), gainMarginDb: -toDb * l });
		}
	}
	return { phase, gain };
}

/**
 * Maximum sensitivity Ms = max over ω ≥ 0 of 1/|1 + L(jω)| (the inverse distance of the Nyquist
 * curve to −1; Åström & Murray, Feedback Systems, 2nd ed., §12.5, from memory), from the local
 * minima of |1 + L| on the grid and next to each phase crossover (where a delayed loop turns too
 * fast for the grid), refined by Brent's minimiser, and the limits ω → 0 and ω → ∞.
 * Returns ms null when the curve passes through −1.
 */
export function maxSensitivity(
	m: LoopModel,
	grid: ArrayLike<number>,
	values?: GridValues,
	phaseCrossovers: readonly number[] = findCrossings(m, grid, values).phase.map((p) => p.w)
): { ms: number | null; w: number | null; reason?: string } {
	const n = grid.length;
	// |1 + L| with sqrt rather than Math.hypot (much slower): |L| ≤ e^300, so no square overflows.
	const dist = (w: number) => {
		const l = loopValue(m, w);
		const re = 1 + l.re;
		return Math.sqrt(re * re + l.im * l.im);
	};
	const v = values ?? evaluateLoop(m, grid);
	const f = scratch(SLOT.sensitivity, n);
	for (let i = 0; i < n; i++) {
		// |1 + L|² = 1 + 2|L|·cos∠L + |L|²: one cosine and no sine. Near −1 this loses digits to
		// cancellation (about √ε absolute in |1 + L|), harmless here: the grid values only pick
		// the candidates, which the minimiser then refines with the exact distance.
		const mag = Math.exp(Math.max(-300, Math.min(300, v.lm[i])));
		f[i] = Math.sqrt(Math.max(0, 1 + mag * (2 * Math.cos(v.ph[i]) + mag)));
	}
	let best = Infinity;
	let bestW: number | null = null;
	// A local minimum of the samples is refined only if |1 + L| could fall below the lowest
	// sample there: its value minus the largest change |dL/d log ω|·Δ(log ω) (slopes at the three
	// samples, with 50 % margin). This skips the many shallow ripples of a delayed loop at high
	// frequency but keeps a sharp dip near −1 that the grid straddles.
	let gridMin = Infinity;
	for (let i = 0; i < n; i++) gridMin = Math.min(gridMin, f[i]);
	const speed = (k: number) => {
		const sl = loopSlopes(m, grid[k]);
		return Math.exp(Math.max(-300, Math.min(300, v.lm[k]))) * modulus(sl.dLogMag, sl.dPhase);
	};
	for (let i = 0; i < n; i++) {
		const left = i > 0 ? f[i - 1] : Infinity;
		const right = i < n - 1 ? f[i + 1] : Infinity;
		if (!(f[i] <= left && f[i] <= right)) continue;
		if (i > 0 && i < n - 1 && f[i] > gridMin) {
			const dx = Math.max(Math.log(grid[i + 1] / grid[i]), Math.log(grid[i] / grid[i - 1]));
			const lip = 1.5 * Math.max(speed(i - 1), speed(i), speed(i + 1));
			if (f[i] - lip * dx > gridMin) continue;
		}
		{
			let w = grid[i];
			// The exact distance at the sample (the scan value above may have lost digits near −1).
			let v = dist(grid[i]);
			if (i > 0 && i < n - 1) {
				const r = brentMinimize((x) => dist(Math.exp(x)), Math.log(grid[i - 1]), Math.log(grid[i + 1]));
				if (r.fx < v) {
					v = r.fx;
					w = Math.exp(r.x);
				}
			}
			if (v < best) {
				best = v;
				bestW = w;
			}
		}
	}
	// Where the phase turns fast (dead time), the samples cannot follow the Nyquist curve; its
	// closest approach to −1 is then next to a phase crossover, where the distance is ≈ |1 − |L||.
	for (const wc of phaseCrossovers) {
		const l = loopValue(m, wc);
		const atCrossing = modulus(1 + l.re, l.im);
		if (!(atCrossing <= 1.2 * best)) continue;
		const turn = Math.abs(loopSlopes(m, wc).dPhase);
		const delta = Math.min(0.05, Math.PI / 4 / Math.max(turn, 1e-12));
		const x = Math.log(wc);
		const r = brentMinimize((x) => dist(Math.exp(x)), x - delta, x + delta);
		const value = Math.min(r.fx, atCrossing);
		if (value < best) {
			best = value;
			bestW = r.fx < atCrossing ? Math.exp(r.x) : wc;
		}
	}
	// Limits outside the grid.
	let reason: string | undefined;
	const originRoot = [...m.zeros, ...m.poles].some((r) => r.re === 0 && r.im === 0);
	if (m.systemType === 0 && !originRoot) {
		const l0 = loopValue(m, 0);
		const d0 = modulus(1 + l0.re, l0.im);
		if (d0 < best) {
			best = d0;
			bestW = 0;
		}
	}
	// ω → ∞: |S| → 1 for a strictly proper loop; with direct feedthrough L(∞) = k (rotating
	// with the delay, so the supremum is 1/(1 − |k|)).
	const g = Math.abs(m.gain);
	const dInf = m.relativeDegree > 0 ? 1 : m.delay > 0 ? Math.abs(1 - g) : Math.abs(1 + m.gain);
	if (dInf < best) {
		best = dInf;
		bestW = null;
		reason = m.relativeDegree > 0 ? 'The supremum |S| = 1 is approached as ω → ∞.' : 'The supremum is approached as ω → ∞ (the loop has direct feedthrough).';
	}
	if (!(best > 1e-12)) return { ms: null, w: null, reason: 'The Nyquist curve passes through −1 (|1 + L| = 0): the sensitivity is unbounded.' };
	return { ms: 1 / best, w: bestW, reason };
}

/**
 * Gain margin, phase margin, their crossover frequencies, the delay margin and Ms of the loop.
 * Choice among several crossings (as python-control `stability_margins`): the gain margin
 * closest to 1 in log sense (min |log GM|), the phase margin of smallest |PM|. Delay margin =
 * min over gain crossovers with PM > 0 of PM[rad]/ω. No phase crossover → GM null ("no phase
 * crossover"); no gain crossover → PM null. PM is wrapped into (−180°, 180°].
 */
export function stabilityMargins(m: LoopModel, grid: ArrayLike<number>, values?: GridValues): Margins {
	const v = values ?? evaluateLoop(m, grid);
	const { phase, gain } = findCrossings(m, grid, v);
	const reasons: Record<string, string> = {};
	const out: Margins = {
		gainMargin: null,
		gainMarginDb: null,
		phaseCrossover: null,
		phaseMargin: null,
		gainCrossover: null,
		delayMargin: null,
		ms: null,
		msFrequency: null,
		phaseCrossings: phase,
		gainCrossings: gain,
		reasons
	};
	if (phase.length > 0) {
		let best = phase[0];
		for (const p of phase) if (Math.abs(p.gainMarginDb) < Math.abs(best.gainMarginDb)) best = p;
		out.gainMargin = best.gainMargin;
		out.gainMarginDb = best.gainMarginDb;
		out.phaseCrossover = best.w;
	} else {
		reasons.gainMargin = 'no phase crossover: the phase never reaches −180° in the analysed band, so the gain margin is infinite';
		reasons.gainMarginDb = reasons.gainMargin;
		reasons.phaseCrossover = 'no phase crossover';
	}
	if (gain.length > 0) {
		let best = gain[0];
		for (const g of gain) if (Math.abs(g.phaseMargin) < Math.abs(best.phaseMargin)) best = g;
		out.phaseMargin = best.phaseMargin;
		out.gainCrossover = best.w;
		let dm = Infinity;
		let negative = false;
		for (const g of gain) {
			if (g.phaseMargin <= 0) negative = true;
			else dm = Math.min(dm, ((g.phaseMargin * Math.PI) / 180) / g.w);
		}
		if (negative) reasons.delayMargin = 'a gain crossover has no positive phase margin';
		else out.delayMargin = dm;
	} else {
		const above = v.lm[0] > 0;
		const why = above ? 'no gain crossover: |L| stays above 1 in the analysed band' : 'no gain crossover: |L| < 1 at all analysed frequencies';
		reasons.phaseMargin = why;
		reasons.gainCrossover = why;
		reasons.delayMargin = above ? why : 'infinite: with |L| < 1 everywhere no dead time can destabilise the loop';
	}
	const ms = maxSensitivity(m, grid, v, phase.map((p) => p.w));
	out.ms = ms.ms;
	out.msFrequency = ms.w;
	if (ms.ms === null) {
		reasons.ms = ms.reason ?? 'unbounded';
		reasons.msFrequency = reasons.ms;
	} else if (ms.w === null) reasons.msFrequency = ms.reason ?? 'at infinite frequency';
	return out;
}
