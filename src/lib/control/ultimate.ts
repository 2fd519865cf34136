/**
 * Ultimate gain Ku, ultimate period Pu and ultimate frequency ωu of a plant with exact dead time:
 * the proportional gain and frequency at which a P-only loop oscillates steadily, found from the
 * phase condition ∠G(jωu) = −180° and Ku = 1/|G(jωu)| (Ziegler & Nichols 1942, Trans. ASME 64,
 * 759–768, closed-loop cycling method; frequency-domain form as in Åström & Hägglund 1995, from memory).
 * Frequencies in rad/s, periods in seconds. The sign of Ku follows the plant's low-frequency sign,
 * so reverse-acting plants (K < 0) get a negative Ku, like the tuning formulas (Kc ∝ 1/K).
 */

import { brentRoot } from './solvers';

/** Ultimate data: ku in controller units (1/plant gain), wu in rad/s, pu = 2π/ωu in seconds. */
export interface UltimateData {
	ku: number;
	wu: number;
	pu: number;
}

/** Either finite ultimate data or the reason why the plant has none. */
export type UltimateOutcome = ({ ok: true } & UltimateData) | { ok: false; reason: string };

/**
 * Root of f on [a, b] where f(a), f(b) have opposite signs (or one is zero), by Brent's method
 * (R. P. Brent, Algorithms for Minimization without Derivatives, Prentice-Hall 1973, ch. 4) —
 * the engine's one implementation in `solvers.ts`, with a tighter default tolerance.
 * Returns null when the interval does not bracket a sign change. Absolute tolerance `tol` on x.
 */
export function findBracketedRoot(
	f: (x: number) => number,
	a: number,
	b: number,
	tol = 1e-14,
	maxIter = 200
): number | null {
	return brentRoot(f, a, b, tol, maxIter);
}

function positive(x: number): boolean {
	return Number.isFinite(x) && x > 0;
}

function nonNegative(x: number): boolean {
	return Number.isFinite(x) && x >= 0;
}

function outcome(ku: number, wu: number): UltimateOutcome {
	if (!Number.isFinite(ku) || !Number.isFinite(wu) || wu <= 0 || ku === 0) {
		return { ok: false, reason: 'The ultimate point could not be computed to finite values.' };
	}
	return { ok: true, ku, wu, pu: (2 * Math.PI) / wu };
}

function checkGain(k: number): string | null {
	return Number.isFinite(k) && k !== 0 ? null : 'The plant gain must be a nonzero finite number.';
}

/**
 * Ultimate data of K·e^(−θs)/(τs+1): solves atan(ωτ) + ωθ = π on [π/(2θ), π/θ] (bracketing root
 * finder), Ku = √(1 + (ωuτ)²)/K. Without dead time the phase never reaches −180° (no finite Ku).
 * τ = 0 (pure delay): ωu = π/θ, Ku = 1/K. θ, τ in seconds.
 */
export function ultimateFopdt(k: number, tau: number, theta: number): UltimateOutcome {
	const badGain = checkGain(k);
	if (badGain) return { ok: false, reason: badGain };
	if (!nonNegative(tau)) return { ok: false, reason: 'The time constant τ must be zero or positive.' };
	if (!nonNegative(theta)) return { ok: false, reason: 'The dead time θ must be zero or positive.' };
	if (theta === 0) {
		return {
			ok: false,
			reason: 'A first-order plant without dead time has no finite ultimate gain: its phase never reaches −180°.'
		};
	}
	if (tau === 0) return outcome(1 / k, Math.PI / theta);
	const wu = findBracketedRoot((w) => Math.atan(w * tau) + w * theta - Math.PI, Math.PI / (2 * theta), Math.PI / theta, 0);
	if (wu === null) return { ok: false, reason: 'The phase equation of the FOPDT model could not be bracketed.' };
	return outcome(Math.hypot(1, wu * tau) / k, wu);
}

/**
 * Ultimate data of K·e^(−θs)/((τ1 s+1)(τ2 s+1)) (overdamped SOPDT): solves
 * atan(ωτ1) + atan(ωτ2) + ωθ = π, Ku = √((1+ω²τ1²)(1+ω²τ2²))/K. Without dead time the phase only
 * approaches −180° (no finite Ku). Times in seconds.
 */
export function ultimateSopdt(k: number, tau1: number, tau2: number, theta: number): UltimateOutcome {
	const badGain = checkGain(k);
	if (badGain) return { ok: false, reason: badGain };
	if (!nonNegative(tau1) || !nonNegative(tau2))
		return { ok: false, reason: 'The time constants τ1, τ2 must be zero or positive.' };
	if (!nonNegative(theta)) return { ok: false, reason: 'The dead time θ must be zero or positive.' };
	if (theta === 0) {
		return {
			ok: false,
			reason:
				'A second-order plant without dead time has no finite ultimate gain: its phase only approaches −180°.'
		};
	}
	const wu = findBracketedRoot(
		(w) => Math.atan(w * tau1) + Math.atan(w * tau2) + w * theta - Math.PI,
		0,
		Math.PI / theta,
		0
	);
	if (wu === null) return { ok: false, reason: 'The phase equation of the SOPDT model could not be bracketed.' };
	return outcome((Math.hypot(1, wu * tau1) * Math.hypot(1, wu * tau2)) / k, wu);
}

/**
 * Ultimate data of Kv·e^(−θs)/s (IPDT), closed form: −90° − ωθ = −180° gives ωu = π/(2θ),
 * Ku = ωu/Kv, Pu = 4θ. Without dead time there is no finite Ku. θ in seconds, Kv in 1/s.
 */
export function ultimateIpdt(kv: number, theta: number): UltimateOutcome {
	const badGain = checkGain(kv);
	if (badGain) return { ok: false, reason: badGain };
	if (!nonNegative(theta)) return { ok: false, reason: 'The dead time θ must be zero or positive.' };
	if (theta === 0) {
		return {
			ok: false,
			reason: 'An integrator without dead time has no finite ultimate gain: its phase stays at −90°.'
		};
	}
	const wu = Math.PI / (2 * theta);
	return outcome(wu / kv, wu);
}

interface C {
	re: number;
	im: number;
}

/** p(jω) for real coefficients in descending powers, by Horner's rule. */
function polyAtJw(coeffs: readonly number[], w: number): C {
	let re = 0;
	let im = 0;
	for (const a of coeffs) {
		// (re + j im)(j w) + a
		const nre = -im * w + a;
		const nim = re * w;
		re = nre;
		im = nim;
	}
	return { re, im };
}

function trimLeading(p: readonly number[]): number[] {
	let i = 0;
	while (i < p.length - 1 && p[i] === 0) i++;
	return p.slice(i);
}

/** Bounds [lo, hi] on the moduli of the nonzero roots (Cauchy bound on p and on its reverse). */
function rootModulusBounds(p: readonly number[]): [number, number] | null {
	const q = trimLeading(p);
	let end = q.length;
	while (end > 1 && q[end - 1] === 0) end--;
	const r = q.slice(0, end);
	if (r.length < 2) return null;
	const lead = r[0];
	const last = r[r.length - 1];
	let hi = 0;
	for (let i = 1; i < r.length; i++) hi = Math.max(hi, Math.abs(r[i] / lead));
	let invHi = 0;
	for (let i = 0; i < r.length - 1; i++) invHi = Math.max(invHi, Math.abs(r[i] / last));
	return [1 / (1 + invHi), 1 + hi];
}

/** Number of trailing zero coefficients (roots at s = 0). */
function zerosAtOrigin(p: readonly number[]): number {
	let n = 0;
	for (let i = p.length - 1; i >= 0 && p[i] === 0; i--) n++;
	return n;
}

/** Options of the general search: frequency grid density (points per decade). */
export interface UltimateSearchOptions {
	pointsPerDecade?: number;
}

/**
 * Ultimate data of a rational plant num(s)/den(s)·e^(−delay·s) (coefficients in descending
 * powers, delay in seconds): the lowest frequency where the phase of sign·G(jω) crosses an odd
 * multiple of −180°, with sign = the plant's low-frequency sign, bracketed on a logarithmic grid
 * (phase unwrapped by small increments, the delay's −ωθ added exactly) and refined with Brent's
 * method; Ku = sign/|G(jωu)|. This is the classical Ku for plants that are stable under small
 * proportional gain (the usual case for Ziegler–Nichols cycling); for open-loop unstable or
 * conditionally stable plants the lowest crossing need not be the stability limit.
 */
export function ultimateRational(
	num: readonly number[],
	den: readonly number[],
	delay = 0,
	options: UltimateSearchOptions = {}
): UltimateOutcome {
	if (!num.length || !den.length || ![...num, ...den].every(Number.isFinite))
		return { ok: false, reason: 'Numerator and denominator must be non-empty lists of finite numbers.' };
	if (!nonNegative(delay)) return { ok: false, reason: 'The dead time must be zero or positive.' };
	const n = trimLeading(num);
	const d = trimLeading(den);
	if (n.every((x) => x === 0)) return { ok: false, reason: 'The numerator is zero.' };
	if (d.every((x) => x === 0)) return { ok: false, reason: 'The denominator is zero.' };
	const nz = zerosAtOrigin(n);
	const dz = zerosAtOrigin(d);
	const lowSign = Math.sign(n[n.length - 1 - nz] / d[d.length - 1 - dz]);

	const scales: number[] = [];
	for (const p of [n, d]) {
		const b = rootModulusBounds(p);
		if (b) scales.push(b[0], b[1]);
	}
	if (delay > 0) scales.push(1 / delay);
	if (!scales.length) scales.push(1);
	const wLo = Math.min(...scales) * 1e-3;
	const wHi = Math.max(...scales) * 1e3;
	const perDecade = options.pointsPerDecade ?? 200;
	const count = Math.max(2, Math.ceil(Math.log10(wHi / wLo) * perDecade) + 1);

	const rational = (w: number): C => {
		const a = polyAtJw(n, w);
		const b = polyAtJw(d, w);
		const den2 = b.re * b.re + b.im * b.im;
		return {
			re: (lowSign * (a.re * b.re + a.im * b.im)) / den2,
			im: (lowSign * (a.im * b.re - a.re * b.im)) / den2
		};
	};
	/** Phase of rational(w) on the branch continuing from (w0, phase0). */
	const phaseNear = (w: number, ref: C, refPhase: number): number => {
		const g = rational(w);
		// arg(g / ref) in (−π, π]
		const re = g.re * ref.re + g.im * ref.im;
		const im = g.im * ref.re - g.re * ref.im;
		return refPhase + Math.atan2(im, re);
	};

	// Start on the low-frequency asymptote branch: −90° per integrator (+90° per differentiator).
	let wPrev = wLo;
	let gPrev = rational(wPrev);
	const asymptote = (-(dz - nz) * Math.PI) / 2;
	let raw = Math.atan2(gPrev.im, gPrev.re);
	raw += 2 * Math.PI * Math.round((asymptote - raw) / (2 * Math.PI));
	let phiPrev = raw; // phase of the rational part only
	const ratio = Math.pow(wHi / wLo, 1 / (count - 1));
	let tPrev = phiPrev - wPrev * delay;
	for (let i = 1; i < count; i++) {
		const w = wLo * Math.pow(ratio, i);
		const phi = phaseNear(w, gPrev, phiPrev);
		const total = phi - w * delay;
		// Crossing of an odd multiple of π between tPrev and total?
		const kPrev = Math.floor((tPrev + Math.PI) / (2 * Math.PI));
		const kNow = Math.floor((total + Math.PI) / (2 * Math.PI));
		if (kPrev !== kNow) {
			const target = 2 * Math.PI * Math.max(kPrev, kNow) - Math.PI;
			const refG = gPrev;
			const refPhi = phiPrev;
			const wu = findBracketedRoot((x) => phaseNear(x, refG, refPhi) - x * delay - target, wPrev, w, 0);
			if (wu === null) return { ok: false, reason: 'The phase crossing could not be refined.' };
			const g = rational(wu);
			return outcome(lowSign / Math.hypot(g.re, g.im), wu);
		}
		wPrev = w;
		gPrev = rational(w);
		phiPrev = phi;
		tPrev = total;
	}
	return {
		ok: false,
		reason: 'The phase never crosses −180°: proportional control alone cannot make this loop oscillate (no finite ultimate gain).'
	};
}
