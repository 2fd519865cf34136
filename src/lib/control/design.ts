/**
 * Controller design from a specification by pole placement: a target damping ratio ζ (or
 * overshoot %) and settling time (or natural frequency ωn) → P / PI / PD / PID gains in ideal
 * form, unfiltered derivative, for first-order K/(τs+1) and second-order plants
 * K/((τ1 s+1)(τ2 s+1)) or K·ωn²/(s² + 2ζωn s + ωn²). Closed-loop characteristic polynomial
 * 1 + C(s)G(s) = 0 matched coefficient by coefficient to the desired one (Åström & Murray,
 * Feedback Systems, 2nd ed., 2021, PI/PID design by pole placement, from memory).
 * Times in seconds, frequencies in rad/s. Dead time is not part of the design (warned).
 */
import type { Complex } from './types';

/** Plant structures for design: first order (+ dead time), two real lags (+ dead time), standard second order. */
export type DesignStructure = 'fopdt' | 'sopdt' | 'second_order';

/** Controller types the design handles. */
export type DesignControllerType = 'P' | 'PI' | 'PD' | 'PID';

/**
 * Plant for design. fopdt: k, tau; sopdt: k, tau, tau2; second_order: k, wn (rad/s), zeta.
 * theta (dead time, s) is optional and ignored by the design (a warning says so).
 */
export interface DesignPlant {
	structure: DesignStructure;
	k: number;
	tau?: number | null;
	tau2?: number | null;
	wn?: number | null;
	zeta?: number | null;
	theta?: number | null;
}

/** Target: ζ or overshoot % (one of them), and settling time (2 %, s) or ωn (rad/s) (one of them). */
export interface DesignTarget {
	zeta?: number | null;
	overshootPercent?: number | null;
	settlingTime?: number | null;
	wn?: number | null;
}

/** Design request; extraPoleFactor α places the third pole of PID on a second-order plant at −α·ζωn (default 5). */
export interface DesignRequest {
	plant: DesignPlant;
	controller: DesignControllerType;
	target: DesignTarget;
	extraPoleFactor?: number | null;
}

/** Design result: ideal-form gains, the placed poles and the desired characteristic polynomial (monic, descending). */
export interface DesignResult {
	controller: DesignControllerType;
	ideal: { kp: number; ti: number | null; td: number | null };
	/** The target as used: ζ, ωn, 2 % settling estimate 4/(ζωn) (null for ζ ≥ 1 or a first-order loop) and overshoot % of the pole pair. */
	target: { zeta: number | null; wn: number | null; settlingTime: number | null; overshootPercent: number | null };
	closedLoopPoles: Complex[];
	characteristic: number[];
	warnings: string[];
}

/** Why a design is impossible or the request invalid; `field` names the request field. */
export type DesignErrorCode = 'invalid' | 'structure' | 'unreachable';

/** A design that cannot be done, with the reason and the request field (dotted path). */
export class DesignError extends Error {
	readonly code: DesignErrorCode;
	readonly field: string | null;
	constructor(code: DesignErrorCode, message: string, field: string | null) {
		super(message);
		this.name = 'DesignError';
		this.code = code;
		this.field = field;
	}
}

/** Default multiple of ζωn for the extra (third) closed-loop pole: 5, a common rule of thumb for a non-dominant pole. */
export const DEFAULT_EXTRA_POLE_FACTOR = 5;

/**
 * Damping ratio from percent overshoot of a standard second-order step response:
 * ζ = −ln(Mp)/√(π² + ln²Mp), Mp = percent/100 (Ogata, Modern Control Engineering, ch. 5, from
 * memory). 0 % gives ζ = 1. Throws DesignError unless 0 ≤ percent < 100.
 */
export function dampingFromOvershoot(percent: number): number {
	if (!(Number.isFinite(percent) && percent >= 0 && percent < 100))
		throw new DesignError('invalid', 'The overshoot must be a percentage from 0 up to (not including) 100.', 'target.overshootPercent');
	if (percent === 0) return 1;
	const l = Math.log(percent / 100);
	return -l / Math.sqrt(Math.PI * Math.PI + l * l);
}

/** Percent overshoot of the standard second-order step response: 100·exp(−ζπ/√(1−ζ²)) for 0 < ζ < 1, else 0 (Ogata, from memory). */
export function overshootFromDamping(zeta: number): number {
	if (!(Number.isFinite(zeta) && zeta > 0))
		throw new DesignError('invalid', 'ζ must be a positive number.', 'target.zeta');
	if (zeta >= 1) return 0;
	return 100 * Math.exp((-zeta * Math.PI) / Math.sqrt(1 - zeta * zeta));
}

/**
 * ωn (rad/s) from the 2 % settling time by the envelope estimate Ts ≈ 4/(ζωn) (Ogata; Nise,
 * Control Systems Engineering, ch. 4; from memory). An approximation: the exact 2 % time can be
 * above or below it. Valid for 0 < ζ < 1.
 */
export function naturalFrequencyFromSettlingTime(settlingTime: number, zeta: number): number {
	if (!(Number.isFinite(settlingTime) && settlingTime > 0))
		throw new DesignError('invalid', 'The settling time must be a positive number of seconds.', 'target.settlingTime');
	if (!(Number.isFinite(zeta) && zeta > 0 && zeta < 1))
		throw new DesignError(
			'invalid',
			'The settling-time estimate Ts ≈ 4/(ζωn) holds for underdamped targets (0 < ζ < 1); give ωn instead.',
			'target.settlingTime'
		);
	return 4 / (zeta * settlingTime);
}

function fmt(x: number): string {
	return Number(x.toPrecision(4)).toString();
}

function positive(x: unknown): x is number {
	return typeof x === 'number' && Number.isFinite(x) && x > 0;
}

function given(x: number | null | undefined): x is number {
	return x !== null && x !== undefined;
}

/** Plant as b/(s + a) (order 1) or b/(s² + a1 s + a0) (order 2). */
type Normalised = { order: 1; b: number; a: number } | { order: 2; b: number; a1: number; a0: number };

function normalisePlant(p: DesignPlant): Normalised {
	if (p === null || typeof p !== 'object') throw new DesignError('invalid', 'The plant must be an object.', 'plant');
	if (!['fopdt', 'sopdt', 'second_order'].includes(p.structure))
		throw new DesignError('invalid', 'The plant structure must be fopdt, sopdt or second_order.', 'plant.structure');
	if (!(typeof p.k === 'number' && Number.isFinite(p.k) && p.k !== 0))
		throw new DesignError('invalid', 'The plant gain k must be a nonzero finite number.', 'plant.k');
	if (given(p.theta) && !(Number.isFinite(p.theta) && p.theta >= 0))
		throw new DesignError('invalid', 'The dead time θ must be zero or a positive number of seconds.', 'plant.theta');
	if (p.structure === 'second_order') {
		if (!positive(p.wn)) throw new DesignError('invalid', 'The plant ωn must be a positive number of rad/s.', 'plant.wn');
		if (!(typeof p.zeta === 'number' && Number.isFinite(p.zeta) && p.zeta >= 0))
			throw new DesignError('invalid', 'The plant ζ must be zero or a positive number.', 'plant.zeta');
		return { order: 2, b: p.k * p.wn * p.wn, a1: 2 * p.zeta * p.wn, a0: p.wn * p.wn };
	}
	if (!positive(p.tau)) throw new DesignError('invalid', 'The time constant τ must be a positive number of seconds.', 'plant.tau');
	if (p.structure === 'fopdt') return { order: 1, b: p.k / p.tau, a: 1 / p.tau };
	if (!positive(p.tau2))
		throw new DesignError('invalid', 'The second time constant τ2 must be a positive number of seconds.', 'plant.tau2');
	const t1t2 = p.tau * p.tau2;
	return { order: 2, b: p.k / t1t2, a1: (p.tau + p.tau2) / t1t2, a0: 1 / t1t2 };
}

interface Spec {
	zeta: number | null;
	wn: number | null;
	settlingTime: number | null;
}

function readTarget(t: DesignTarget): Spec {
	if (t === null || typeof t !== 'object') throw new DesignError('invalid', 'The target must be an object.', 'target');
	if (given(t.zeta) && given(t.overshootPercent))
		throw new DesignError('invalid', 'Give either ζ or the overshoot, not both.', 'target.overshootPercent');
	if (given(t.settlingTime) && given(t.wn))
		throw new DesignError('invalid', 'Give either the settling time or ωn, not both.', 'target.wn');
	let zeta: number | null = null;
	if (given(t.zeta)) {
		if (!positive(t.zeta)) throw new DesignError('invalid', 'ζ must be a positive number.', 'target.zeta');
		zeta = t.zeta;
	} else if (given(t.overshootPercent)) {
		zeta = dampingFromOvershoot(t.overshootPercent);
	}
	let wn: number | null = null;
	let settlingTime: number | null = null;
	if (given(t.wn)) {
		if (!positive(t.wn)) throw new DesignError('invalid', 'ωn must be a positive number of rad/s.', 'target.wn');
		wn = t.wn;
	} else if (given(t.settlingTime)) {
		if (!positive(t.settlingTime))
			throw new DesignError('invalid', 'The settling time must be a positive number of seconds.', 'target.settlingTime');
		settlingTime = t.settlingTime;
		if (zeta !== null) wn = naturalFrequencyFromSettlingTime(t.settlingTime, zeta);
	}
	return { zeta, wn, settlingTime };
}

function requireZetaWn(spec: Spec): { zeta: number; wn: number } {
	if (spec.zeta === null)
		throw new DesignError('invalid', 'This design needs a damping target: give ζ or the overshoot %.', 'target.zeta');
	if (spec.wn === null)
		throw new DesignError('invalid', 'This design needs a speed target: give the settling time or ωn.', 'target.settlingTime');
	return { zeta: spec.zeta, wn: spec.wn };
}

/** Roots of s² + 2ζωn s + ωn² (closed form). */
function pairPoles(zeta: number, wn: number): Complex[] {
	const sigma = -zeta * wn;
	if (zeta < 1) {
		const wd = wn * Math.sqrt(1 - zeta * zeta);
		return [
			{ re: sigma, im: wd },
			{ re: sigma, im: -wd }
		];
	}
	const d = wn * Math.sqrt(zeta * zeta - 1);
	return [
		{ re: sigma + d, im: 0 },
		{ re: sigma - d, im: 0 }
	];
}

function targetOf(zeta: number | null, wn: number | null): DesignResult['target'] {
	return {
		zeta,
		wn,
		settlingTime: zeta !== null && wn !== null && zeta < 1 ? 4 / (zeta * wn) : null,
		overshootPercent: zeta !== null ? overshootFromDamping(zeta) : null
	};
}

const ZERO_NOTE =
	'The controller adds closed-loop zeros, so overshoot and settling differ from the second-order formulas; check the step response on the bench (set-point weighting reduces the overshoot).';

/**
 * Designs a controller by pole placement (ideal form, unfiltered derivative). Gains:
 * first order b/(s+a) [b = K/τ, a = 1/τ]: P places the pole at −4/Ts (or −ωn), Kc = (σ − a)/b;
 * PI: Kc = (2ζωn − a)/b, Ti = bKc/ωn². Second order b/(s² + a1 s + a0): P sets ζ only
 * (ωn = a1/(2ζ), Kc = (ωn² − a0)/b); PD: Kc = (ωn² − a0)/b, Td = (2ζωn − a1)/(bKc);
 * PI: third pole p = a1 − 2ζωn, Kc = (ωn² + 2ζωn p − a0)/b, Ti = bKc/(ωn² p);
 * PID: third pole p = α·ζωn, Kc = (ωn² + 2ζωn p − a0)/b, Td = (2ζωn + p − a1)/(bKc), Ti = bKc/(ωn² p).
 * Throws DesignError (field named) when the request is invalid, the structure cannot place the
 * poles, or the target needs a negative gain or time.
 */
export function designController(request: DesignRequest): DesignResult {
	if (request === null || typeof request !== 'object') throw new DesignError('invalid', 'The request must be an object.', null);
	const controller = request.controller;
	if (!['P', 'PI', 'PD', 'PID'].includes(controller))
		throw new DesignError('invalid', 'The controller must be P, PI, PD or PID.', 'controller');
	const plant = normalisePlant(request.plant);
	const spec = readTarget(request.target);
	const alpha = request.extraPoleFactor ?? DEFAULT_EXTRA_POLE_FACTOR;
	if (!(Number.isFinite(alpha) && alpha > 1))
		throw new DesignError('invalid', 'The extra-pole factor must be a number greater than 1.', 'extraPoleFactor');
	const warnings: string[] = [];
	const theta = request.plant.theta ?? 0;
	if (theta > 0)
		warnings.push(
			`Designed on the delay-free part of the model: the dead time θ = ${fmt(theta)} s is ignored and will reduce the damping; check the response with the dead time on the bench.`
		);
	const sign = (bk: number) => bk > 0;

	if (plant.order === 1) {
		const { b, a } = plant;
		if (controller === 'PD' || controller === 'PID')
			throw new DesignError(
				'structure',
				controller === 'PD'
					? 'PD on a first-order plant gives a single closed-loop pole, so ζ cannot be placed; use P (speed only) or PI.'
					: 'PID on a first-order plant has more gains than closed-loop poles to place; use PI.',
				'controller'
			);
		if (controller === 'P') {
			let sigma: number;
			if (spec.settlingTime !== null) sigma = 4 / spec.settlingTime;
			else if (spec.wn !== null) sigma = spec.wn;
			else throw new DesignError('invalid', 'P on a first-order plant needs a settling time (or ωn, taken as the pole speed).', 'target.settlingTime');
			const kp = (sigma - a) / b;
			if (!sign(kp * b))
				throw new DesignError(
					'unreachable',
					`The target pole −${fmt(sigma)} rad/s is not faster than the open-loop pole −${fmt(a)} rad/s; P control cannot slow the loop down.`,
					spec.settlingTime !== null ? 'target.settlingTime' : 'target.wn'
				);
			if (spec.zeta !== null) warnings.push('A first-order loop under P control has a single real pole: the damping target is not used.');
			warnings.push(
				`P control leaves a steady-state error of ${fmt(100 / (1 + kp * b / a))} % of a set-point step (final value theorem).`
			);
			return {
				controller,
				ideal: { kp, ti: null, td: null },
				target: { zeta: null, wn: null, settlingTime: 4 / sigma, overshootPercent: 0 },
				closedLoopPoles: [{ re: -sigma, im: 0 }],
				characteristic: [1, sigma],
				warnings
			};
		}
		const { zeta, wn } = requireZetaWn(spec);
		const kp = (2 * zeta * wn - a) / b;
		if (!sign(kp * b))
			throw new DesignError(
				'unreachable',
				`The target ζωn = ${fmt(zeta * wn)} rad/s must exceed half the open-loop pole speed, ${fmt(a / 2)} rad/s, for a positive PI gain.`,
				spec.settlingTime !== null ? 'target.settlingTime' : 'target.wn'
			);
		const ti = (b * kp) / (wn * wn);
		warnings.push(ZERO_NOTE);
		return {
			controller,
			ideal: { kp, ti, td: null },
			target: targetOf(zeta, wn),
			closedLoopPoles: pairPoles(zeta, wn),
			characteristic: [1, 2 * zeta * wn, wn * wn],
			warnings
		};
	}

	const { b, a1, a0 } = plant;
	if (controller === 'P') {
		if (spec.zeta === null)
			throw new DesignError('invalid', 'P on a second-order plant sets the damping only: give ζ or the overshoot %.', 'target.zeta');
		const zeta = spec.zeta;
		if (a1 === 0)
			throw new DesignError('unreachable', 'The plant is undamped (ζ = 0): P control cannot add damping; use PD or PID.', 'controller');
		const wn = a1 / (2 * zeta);
		const kp = (wn * wn - a0) / b;
		if (!sign(kp * b))
			throw new DesignError(
				'unreachable',
				`ζ = ${fmt(zeta)} is at or above the open-loop damping ${fmt(a1 / (2 * Math.sqrt(a0)))}: P control can only lower the damping; use PD or PID.`,
				'target.zeta'
			);
		if (spec.wn !== null && Math.abs(spec.wn - wn) > 1e-9 * wn)
			warnings.push(
				`P control cannot set both ζ and the speed: with ζ = ${fmt(zeta)} the loop gets ωn = ${fmt(wn)} rad/s${zeta < 1 ? ` (settling ≈ ${fmt(4 / (zeta * wn))} s)` : ''}, not the requested ${fmt(spec.wn)} rad/s.`
			);
		warnings.push(`P control leaves a steady-state error of ${fmt(100 * a0 / (a0 + kp * b))} % of a set-point step (final value theorem).`);
		return {
			controller,
			ideal: { kp, ti: null, td: null },
			target: targetOf(zeta, wn),
			closedLoopPoles: pairPoles(zeta, wn),
			characteristic: [1, 2 * zeta * wn, wn * wn],
			warnings
		};
	}

	const { zeta, wn } = requireZetaWn(spec);
	const speedField = spec.settlingTime !== null ? 'target.settlingTime' : 'target.wn';
	if (controller === 'PD') {
		const kp = (wn * wn - a0) / b;
		if (!sign(kp * b))
			throw new DesignError(
				'unreachable',
				`ωn = ${fmt(wn)} rad/s must exceed the open-loop ωn = ${fmt(Math.sqrt(a0))} rad/s for a positive PD gain.`,
				speedField
			);
		const td = (2 * zeta * wn - a1) / (b * kp);
		if (td < 0)
			throw new DesignError(
				'unreachable',
				`The target needs a negative derivative time: 2ζωn = ${fmt(2 * zeta * wn)} rad/s is below the plant's ${fmt(a1)} rad/s; lower ζ or raise the speed, or use P.`,
				'target.zeta'
			);
		warnings.push(ZERO_NOTE);
		warnings.push(`PD control leaves a steady-state error of ${fmt(100 * a0 / (a0 + kp * b))} % of a set-point step (final value theorem).`);
		return {
			controller,
			ideal: { kp, ti: null, td },
			target: targetOf(zeta, wn),
			closedLoopPoles: pairPoles(zeta, wn),
			characteristic: [1, 2 * zeta * wn, wn * wn],
			warnings
		};
	}

	let p: number;
	if (controller === 'PI') {
		p = a1 - 2 * zeta * wn;
		if (!(p > 0))
			throw new DesignError(
				'unreachable',
				`PI on this plant fixes the sum of the closed-loop pole speeds at ${fmt(a1)} rad/s: the target needs 2ζωn < ${fmt(a1)} rad/s (here ${fmt(2 * zeta * wn)}); use PID for a faster loop.`,
				speedField
			);
		if (p < DEFAULT_EXTRA_POLE_FACTOR * zeta * wn)
			warnings.push(
				`The third closed-loop pole at −${fmt(p)} rad/s is not well separated from the pair (ζωn = ${fmt(zeta * wn)} rad/s): the response will differ from the second-order formulas.`
			);
	} else {
		p = alpha * zeta * wn;
	}
	const kp = (wn * wn + 2 * zeta * wn * p - a0) / b;
	if (!sign(kp * b))
		throw new DesignError(
			'unreachable',
			`The target is slower than the plant itself: ${controller} would need a negative gain; raise ωn (shorten the settling time).`,
			speedField
		);
	const ti = (b * kp) / (wn * wn * p);
	let td: number | null = null;
	if (controller === 'PID') {
		td = (2 * zeta * wn + p - a1) / (b * kp);
		if (td < 0)
			throw new DesignError(
				'unreachable',
				`The target needs a negative derivative time (2ζωn + α·ζωn = ${fmt(2 * zeta * wn + p)} rad/s is below the plant's ${fmt(a1)} rad/s); use PI or a faster target.`,
				speedField
			);
	}
	warnings.push(ZERO_NOTE);
	const pair = [1, 2 * zeta * wn, wn * wn];
	return {
		controller,
		ideal: { kp, ti, td },
		target: targetOf(zeta, wn),
		closedLoopPoles: [...pairPoles(zeta, wn), { re: -p, im: 0 }],
		characteristic: [1, pair[1] + p, pair[2] + pair[1] * p, pair[2] * p],
		warnings
	};
}
