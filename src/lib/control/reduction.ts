/**
 * Model reduction by Skogestad's half rule (S. Skogestad, "Simple analytic rules for model
 * reduction and PID controller tuning", J. Process Control 13 (2003) 291–309, section 3):
 * a plant given as gain, lags, LHP zeros, RHP zeros and delay is approximated by a first-order
 * (FOPDT) or second-order (SOPDT) plus dead time model. Times in seconds.
 */
import { roots } from './roots';

/** Plant in time-constant form: k·Π(T0,j s+1)·Π(−Tk s+1)/Π(τi s+1)·e^(−delay·s). */
export interface HalfRuleInput {
	/** Steady-state gain k. */
	gain: number;
	/** Lag time constants τi of (τi s+1), seconds, > 0. */
	lags: readonly number[];
	/** Time constants T0 of LHP zeros (T0 s+1), seconds, > 0. */
	leads?: readonly number[];
	/** Time constants T of RHP zeros (−T s+1), seconds, > 0. */
	rhpZeros?: readonly number[];
	/** Dead time θ0, seconds, ≥ 0. */
	delay?: number;
	/** Sampling period h of a digital controller, seconds, ≥ 0 (adds h/2 to the delay). */
	samplingPeriod?: number;
}

/** First-order plus dead time model k·e^(−θs)/(τs+1); seconds. */
export interface FopdtModel {
	k: number;
	tau: number;
	theta: number;
}

/** Second-order plus dead time model k·e^(−θs)/((τ1 s+1)(τ2 s+1)), τ1 ≥ τ2; seconds. */
export interface SopdtModel {
	k: number;
	tau1: number;
	tau2: number;
	theta: number;
}

/** Reduced models with the steps taken; `sopdt` is null (with `sopdtReason`) when fewer than two lags remain. */
export interface HalfRuleResult {
	fopdt: FopdtModel;
	sopdt: SopdtModel | null;
	sopdtReason: string | null;
	/** Human-readable steps (zero cancellations, what went into the delay). */
	notes: string[];
}

/** Thrown when the plant cannot be reduced; `field` names the offending input. */
export class ReductionError extends Error {
	readonly field: string;
	constructor(field: string, message: string) {
		super(message);
		this.name = 'ReductionError';
		this.field = field;
	}
}

function fmt(x: number): string {
	return Number(x.toPrecision(6)).toString();
}

function checkList(field: string, list: readonly number[] | undefined): number[] {
	if (list === undefined) return [];
	if (!Array.isArray(list)) throw new ReductionError(field, `${field} must be a list of time constants.`);
	list.forEach((x, i) => {
		if (!(Number.isFinite(x) && x > 0))
			throw new ReductionError(`${field}.${i}`, `Each time constant in ${field} must be a positive number of seconds.`);
	});
	return [...list];
}

function checkNonNegative(field: string, x: number | undefined): number {
	if (x === undefined) return 0;
	if (!(Number.isFinite(x) && x >= 0)) throw new ReductionError(field, `${field} must be zero or a positive number of seconds.`);
	return x;
}

/** Effective delay of the FOPDT reduction of the given (descending) lags plus the fixed delay terms. */
function fopdtDelay(lagsDesc: readonly number[], fixedDelay: number): number {
	let theta = fixedDelay;
	if (lagsDesc.length > 1) theta += lagsDesc[1] / 2;
	for (let i = 2; i < lagsDesc.length; i++) theta += lagsDesc[i];
	return theta;
}

/**
 * Half-rule reduction (Skogestad 2003, section 3). LHP zeros are cancelled first, smallest first,
 * each against the smallest lag τ0 ≥ T0 if there is one (pair → lag τ0 − T0), otherwise against
 * the largest remaining lag τ0 < T0, with θ = effective FOPDT delay of the other terms:
 * T0 ≥ τ0 ≥ θ → gain T0/τ0; T0 ≥ θ ≥ τ0 → gain T0/θ; θ ≥ T0 → gain 1 (Skogestad 2003, eq. 10,
 * from memory). Then the largest neglected lag is split in half between the delay and the
 * smallest retained lag; smaller lags, RHP-zero time constants and h/2 go fully into the delay:
 * FOPDT τ = τ1 + τ2/2, θ = θ0 + τ2/2 + Σi≥3 τi + ΣT + h/2;
 * SOPDT τ1, τ2 + τ3/2, θ = θ0 + τ3/2 + Σi≥4 τi + ΣT + h/2.
 */
export function halfRule(input: HalfRuleInput): HalfRuleResult {
	if (!Number.isFinite(input.gain) || input.gain === 0)
		throw new ReductionError('gain', 'The gain must be a nonzero finite number.');
	let lags = checkList('lags', input.lags);
	const leads = checkList('leads', input.leads).sort((a, b) => a - b);
	const rhp = checkList('rhpZeros', input.rhpZeros);
	const delay0 = checkNonNegative('delay', input.delay);
	const h = checkNonNegative('samplingPeriod', input.samplingPeriod);
	if (lags.length === 0) throw new ReductionError('lags', 'The half rule needs at least one lag time constant.');
	const notes: string[] = [];
	let k = input.gain;
	const fixedDelay = delay0 + rhp.reduce((s, t) => s + t, 0) + h / 2;
	if (rhp.length) notes.push(`RHP zero time constants ${rhp.map(fmt).join(', ')} s added to the delay.`);
	if (h > 0) notes.push(`Half the sampling period (${fmt(h / 2)} s) added to the delay.`);

	for (const t0 of leads) {
		if (lags.length === 0)
			throw new ReductionError('leads', 'There are more LHP zeros than lags: each zero needs a lag to cancel against.');
		const larger = lags.filter((t) => t >= t0);
		if (larger.length) {
			const tau0 = Math.min(...larger);
			lags.splice(lags.indexOf(tau0), 1);
			const rest = tau0 - t0;
			if (rest > 0) lags.push(rest);
			notes.push(
				rest > 0
					? `LHP zero ${fmt(t0)} s cancelled against lag ${fmt(tau0)} s, leaving a lag of ${fmt(rest)} s.`
					: `LHP zero ${fmt(t0)} s cancels lag ${fmt(tau0)} s exactly.`
			);
			continue;
		}
		const tau0 = Math.max(...lags);
		lags.splice(lags.indexOf(tau0), 1);
		const theta = fopdtDelay([...lags].sort((a, b) => b - a), fixedDelay);
		let factor: number;
		if (tau0 >= theta) factor = t0 / tau0;
		else if (t0 >= theta) factor = t0 / theta;
		else factor = 1;
		k *= factor;
		notes.push(
			`LHP zero ${fmt(t0)} s larger than every lag: pair with lag ${fmt(tau0)} s replaced by the gain ${fmt(factor)} (effective delay ${fmt(theta)} s).`
		);
	}
	if (lags.length === 0) throw new ReductionError('leads', 'No lag is left after cancelling the LHP zeros.');
	lags = lags.sort((a, b) => b - a);

	const fopdt: FopdtModel = {
		k,
		tau: lags[0] + (lags.length > 1 ? lags[1] / 2 : 0),
		theta: fopdtDelay(lags, fixedDelay)
	};
	let sopdt: SopdtModel | null = null;
	let sopdtReason: string | null = null;
	if (lags.length >= 2) {
		let theta = fixedDelay + (lags.length > 2 ? lags[2] / 2 : 0);
		for (let i = 3; i < lags.length; i++) theta += lags[i];
		sopdt = { k, tau1: lags[0], tau2: lags[1] + (lags.length > 2 ? lags[2] / 2 : 0), theta };
	} else {
		sopdtReason = 'Only one lag remains, so there is no second-order model.';
	}
	return { fopdt, sopdt, sopdtReason, notes };
}

/** Outcome of reduceRational: the reduction, or the reason the half rule cannot be used. */
export type RationalReduction =
	| ({ ok: true; lags: number[]; leads: number[]; rhpZeros: number[] } & HalfRuleResult)
	| { ok: false; reason: string; field: string };

/**
 * Half-rule reduction of num(s)/den(s)·e^(−delay·s) (descending coefficients, delay in seconds):
 * time constants from the polynomial roots (a real root −1/τ gives (τs+1); a positive real zero
 * 1/T gives (−Ts+1)), gain num(0)/den(0), then `halfRule`. Only real roots qualify: complex
 * pairs, poles at the origin or in the RHP, and zeros at the origin give { ok: false } with the
 * reason — there is no half-rule equivalent; identify an SOPDT model from a step test instead,
 * or use the standard second-order structure. Roots whose imaginary part is below 1e-4·|root|
 * count as real (multiple roots are only computed to about ε^(1/m)).
 */
export function reduceRational(
	num: readonly number[],
	den: readonly number[],
	delay = 0,
	samplingPeriod = 0
): RationalReduction {
	const finiteList = (p: readonly number[]) => Array.isArray(p) && p.length > 0 && p.every(Number.isFinite);
	if (!finiteList(num)) return { ok: false, field: 'num', reason: 'The numerator must be a non-empty list of finite numbers.' };
	if (!finiteList(den)) return { ok: false, field: 'den', reason: 'The denominator must be a non-empty list of finite numbers.' };
	if (!(Number.isFinite(delay) && delay >= 0)) return { ok: false, field: 'delay', reason: 'The delay must be zero or positive.' };
	const n = trim(num);
	const d = trim(den);
	if (n.length === 0) return { ok: false, field: 'num', reason: 'The numerator is zero.' };
	if (d.length === 0) return { ok: false, field: 'den', reason: 'The denominator is zero.' };
	if (n.length > d.length) return { ok: false, field: 'num', reason: 'The plant is improper (more zeros than poles).' };
	if (d[d.length - 1] === 0)
		return { ok: false, field: 'den', reason: 'The plant has a pole at the origin (integrating): use the IPDT structure instead of the half rule.' };
	if (n[n.length - 1] === 0) return { ok: false, field: 'num', reason: 'The plant has a zero at the origin (zero steady-state gain): no FOPDT equivalent.' };
	const gain = n[n.length - 1] / d[d.length - 1];

	const poles = roots(d);
	const zeros = roots(n);
	const isReal = (z: { re: number; im: number }) => Math.abs(z.im) <= 1e-4 * Math.hypot(z.re, z.im);
	if (!poles.every(isReal))
		return {
			ok: false,
			field: 'den',
			reason: 'The plant has complex poles: the half rule needs real lags. Use the standard second-order structure or fit an SOPDT model to step data.'
		};
	if (!zeros.every(isReal))
		return { ok: false, field: 'num', reason: 'The plant has complex zeros: the half rule needs real zeros.' };
	const lags: number[] = [];
	for (const p of poles) {
		if (p.re >= 0)
			return { ok: false, field: 'den', reason: 'The plant has an unstable pole: the half rule applies to stable plants only.' };
		lags.push(-1 / p.re);
	}
	const leads: number[] = [];
	const rhpZeros: number[] = [];
	for (const z of zeros) {
		if (z.re < 0) leads.push(-1 / z.re);
		else rhpZeros.push(1 / z.re);
	}
	try {
		const res = halfRule({ gain, lags, leads, rhpZeros, delay, samplingPeriod });
		return { ok: true, lags, leads, rhpZeros, ...res };
	} catch (e) {
		if (e instanceof ReductionError) return { ok: false, field: e.field, reason: e.message };
		throw e;
	}
}

function trim(p: readonly number[]): number[] {
	let i = 0;
	while (i < p.length && p[i] === 0) i++;
	return p.slice(i);
}
