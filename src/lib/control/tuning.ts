/**
 * Published PID tuning rules for FOPDT, SOPDT and IPDT models: Ziegler–Nichols (reaction curve
 * and ultimate gain), Cohen–Coon, Chien–Hrones–Reswick, IMC-PID (Rivera–Morari–Skogestad), SIMC,
 * lambda, AMIGO and Tyreus–Luyben. Each rule returns the settings in the form it was published in
 * and in the ideal (ISA) form, with warnings when the model lies outside the rule's validity range.
 * Times in seconds; gains in 1/(plant gain units). Formulas and sources: see TUNING_RULES.
 */
import { seriesToIdeal } from './conversions';
import { halfRule } from './reduction';
import { ultimateFopdt, ultimateIpdt, ultimateSopdt, type UltimateOutcome } from './ultimate';
import type { ControllerForm } from './types';

/** Identifiers of the tuning rules (API contract). */
export type TuningRuleId =
	| 'zn-step'
	| 'zn-ultimate'
	| 'cohen-coon'
	| 'chr-setpoint-0'
	| 'chr-setpoint-20'
	| 'chr-load-0'
	| 'chr-load-20'
	| 'imc'
	| 'simc'
	| 'lambda'
	| 'amigo'
	| 'tyreus-luyben';

/** All rule identifiers in display order. */
export const TUNING_RULE_IDS: readonly TuningRuleId[] = [
	'zn-step',
	'zn-ultimate',
	'cohen-coon',
	'chr-setpoint-0',
	'chr-setpoint-20',
	'chr-load-0',
	'chr-load-20',
	'imc',
	'simc',
	'lambda',
	'amigo',
	'tyreus-luyben'
];

/** Model structures the rules accept. */
export type TuningStructure = 'fopdt' | 'sopdt' | 'ipdt';
/** Controller types a rule may publish ('PD' only where a rule publishes it). */
export type TuningControllerType = 'P' | 'PI' | 'PD' | 'PID';

/**
 * Plant for tuning: FOPDT k·e^(−θs)/(τs+1); SOPDT k·e^(−θs)/((τs+1)(τ2 s+1)); IPDT k·e^(−θs)/s
 * (k = Kv in 1/s). tau, tau2, theta in seconds.
 */
export interface TuningPlant {
	structure: TuningStructure;
	k: number;
	tau?: number | null;
	tau2?: number | null;
	theta: number;
}

/** Tuning request (API contract); parameter = τc or λ in seconds where the rule has one. */
export interface TuningRequest {
	plant: TuningPlant;
	rule: TuningRuleId;
	controller: TuningControllerType;
	parameter?: number | null;
}

/** Kp (dimensionless per plant gain) with Ti, Td in seconds, null where unused. */
export interface TuningGains {
	kp: number;
	ti: number | null;
	td: number | null;
}

/** Tuning result (API contract): ideal-form settings plus the settings as published. */
export interface TuningResult {
	rule: TuningRuleId;
	controller: TuningControllerType;
	ideal: TuningGains;
	published: TuningGains & { form: ControllerForm };
	warnings: string[];
}

/** Why a rule cannot be applied: bad input, wrong structure/controller, no finite Ku, bad parameter. */
export type TuningErrorCode = 'invalid-plant' | 'structure' | 'controller' | 'no-ultimate' | 'parameter' | 'rule';

/** A rule that does not apply or an invalid request; `field` names the request field (dotted path). */
export class TuningError extends Error {
	readonly code: TuningErrorCode;
	readonly field: string | null;
	constructor(code: TuningErrorCode, message: string, field: string | null = null) {
		super(message);
		this.name = 'TuningError';
		this.code = code;
		this.field = field;
	}
}

/** Description of a rule's tuning parameter for the UI. */
export interface TuningParameterInfo {
	symbol: string;
	meaning: string;
	defaultText: string;
}

/** Metadata of a rule for the bench's rule table. */
export interface TuningRuleInfo {
	id: TuningRuleId;
	name: string;
	citation: string;
	aim: string;
	validity: string;
	publishedForm: string;
	controllers: readonly TuningControllerType[];
	structures: readonly TuningStructure[];
	parameter: TuningParameterInfo | null;
	notes: string;
}

const ZN = 'J. G. Ziegler, N. B. Nichols, "Optimum settings for automatic controllers", Trans. ASME 64 (1942) 759–768';
const CHR =
	'K. L. Chien, J. A. Hrones, J. B. Reswick, "On the automatic control of generalized passive systems", Trans. ASME 74 (1952) 175–185 (table as given by Åström & Hägglund, PID Controllers, ISA 1995)';

/**
 * Rule metadata: name, citation, design aim, validity range, published form, parameter.
 * Cohen–Coon PI is pinned to the gain factor 0.9 + r/12 (Seborg et al.); sources disagree (one
 * handbook table prints 1.1 + r/12), which the rule's notes tell the user.
 */
export const TUNING_RULES: Readonly<Record<TuningRuleId, TuningRuleInfo>> = {
	'zn-step': {
		id: 'zn-step',
		name: 'Ziegler–Nichols reaction curve',
		citation: ZN,
		aim: 'Quarter-amplitude decay of load disturbances.',
		validity: 'Commonly advised for 0.1 ≤ θ/τ ≤ 1; aggressive, with little robustness.',
		publishedForm: 'ideal',
		controllers: ['P', 'PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: null,
		notes:
			'a = K·θ/τ (IPDT: a = Kv·θ). PI integral time as in the 1942 paper, Ti = θ/0.3 ≈ 3.33θ; many later tables print 3θ. SOPDT models are first reduced to FOPDT by the half rule.'
	},
	'zn-ultimate': {
		id: 'zn-ultimate',
		name: 'Ziegler–Nichols ultimate gain',
		citation: ZN,
		aim: 'Quarter-amplitude decay of load disturbances.',
		validity: 'Any model with a finite ultimate gain; aggressive, with little robustness.',
		publishedForm: 'ideal',
		controllers: ['P', 'PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: null,
		notes: 'Ku and Pu are computed from the model with the exact dead time. PI as in the 1942 paper: 0.45·Ku, Pu/1.2.'
	},
	'cohen-coon': {
		id: 'cohen-coon',
		name: 'Cohen–Coon',
		citation:
			'G. H. Cohen, G. A. Coon, "Theoretical consideration of retarded control", Trans. ASME 75 (1953) 827–834',
		aim: 'Quarter-amplitude decay with minimum offset for load changes.',
		validity: 'Self-regulating processes; commonly quoted as useful up to θ/τ ≈ 1.',
		publishedForm: 'ideal',
		controllers: ['P', 'PI', 'PD', 'PID'],
		structures: ['fopdt', 'sopdt'],
		parameter: null,
		notes:
			'PI gain factor 0.9 + r/12 (as in Seborg, Edgar & Mellichamp); one handbook table prints 1.1 + r/12. SOPDT models are first reduced to FOPDT by the half rule.'
	},
	'chr-setpoint-0': chrInfo('chr-setpoint-0', 'set-point', 0),
	'chr-setpoint-20': chrInfo('chr-setpoint-20', 'set-point', 20),
	'chr-load-0': chrInfo('chr-load-0', 'load', 0),
	'chr-load-20': chrInfo('chr-load-20', 'load', 20),
	imc: {
		id: 'imc',
		name: 'IMC-PID (Rivera–Morari–Skogestad)',
		citation:
			'D. E. Rivera, M. Morari, S. Skogestad, "Internal model control. 4. PID controller design", Ind. Eng. Chem. Process Des. Dev. 25 (1986) 252–265',
		aim: 'First-order closed-loop set-point response with time constant λ.',
		validity: 'PID: λ/θ > 0.8 and λ > 0.2τ; PI: λ/θ > 1.7.',
		publishedForm: 'ideal',
		controllers: ['PI', 'PID'],
		structures: ['fopdt', 'sopdt'],
		parameter: {
			symbol: 'λ',
			meaning: 'closed-loop (IMC filter) time constant, seconds',
			defaultText: 'PID: max(0.8θ, 0.2τ); PI: max(1.7θ, 0.2τ)'
		},
		notes:
			'PI: Kc = τ/(Kλ), Ti = τ (delay left out of the controller model, hence λ/θ > 1.7); the Taylor-delay variant τ/(K(λ+θ)) is the lambda rule. PID uses the first-order Padé approximation without the extra lag filter. SOPDT models are first reduced to FOPDT by the half rule.'
	},
	simc: {
		id: 'simc',
		name: 'SIMC (Skogestad)',
		citation:
			'S. Skogestad, "Simple analytic rules for model reduction and PID controller tuning", J. Process Control 13 (2003) 291–309',
		aim: 'Smooth, robust set-point response with closed-loop time constant τc and good disturbance rejection.',
		validity: 'All θ/τ; τc ≥ θ recommended; PID (from an SOPDT model) only if τ2 is larger than about θ.',
		publishedForm: 'ideal for PI (any form), series for PID',
		controllers: ['PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: { symbol: 'τc', meaning: 'desired closed-loop time constant, seconds', defaultText: 'τc = θ (tight control)' },
		notes: 'PID is published in series form with Td = τ2 and needs an SOPDT model; PI on an SOPDT model uses the half-rule FOPDT.'
	},
	lambda: {
		id: 'lambda',
		name: 'Lambda tuning',
		citation:
			'E. B. Dahlin, "Designing and tuning digital controllers", Instruments and Control Systems 41(6) (1968) 77–83; Åström & Hägglund, Advanced PID Control, ISA 2006',
		aim: 'Non-oscillating first-order closed-loop response with time constant λ.',
		validity: 'λ ≥ θ for robustness.',
		publishedForm: 'ideal',
		controllers: ['PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: {
			symbol: 'λ',
			meaning: 'desired closed-loop time constant, seconds',
			defaultText: 'self-regulating: λ = τ; integrating: λ = 2θ'
		},
		notes:
			'PID (self-regulating only) uses the Padé form, identical to the IMC-PID row. SOPDT models are first reduced to FOPDT by the half rule.'
	},
	amigo: {
		id: 'amigo',
		name: 'AMIGO (Åström–Hägglund)',
		citation:
			'K. J. Åström, T. Hägglund, "Revisiting the Ziegler–Nichols step response method for PID control", J. Process Control 14 (2004) 635–650',
		aim: 'Maximum integral gain subject to a robustness constraint (Ms about 1.4).',
		validity: 'PI: the whole range of normalised dead time; PID from a first-order model is conservative for lag-dominated processes.',
		publishedForm: 'ideal (with set-point weights)',
		controllers: ['PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: null,
		notes: 'SOPDT models are first reduced to FOPDT by the half rule.'
	},
	'tyreus-luyben': {
		id: 'tyreus-luyben',
		name: 'Tyreus–Luyben',
		citation:
			'B. D. Tyreus, W. L. Luyben, "Tuning PI controllers for integrator/dead time processes", Ind. Eng. Chem. Res. 31 (1992) 2625–2628; W. L. Luyben, Ind. Eng. Chem. Res. 35 (1996) 3480–3483 for integrating PID',
		aim: 'More conservative than Ziegler–Nichols, for lag-dominant and integrating loops.',
		validity: 'Any model with a finite ultimate gain.',
		publishedForm: 'ideal',
		controllers: ['PI', 'PID'],
		structures: ['fopdt', 'sopdt', 'ipdt'],
		parameter: null,
		notes:
			'Ku and Pu from the model with exact dead time. PID on an IPDT model uses Luyben (1996): Kc = 0.46·Ku, Td = 1/ωu, with Ti = 2.2·Pu.'
	}
};

function chrInfo(id: TuningRuleId, target: 'set-point' | 'load', overshoot: 0 | 20): TuningRuleInfo {
	const what = target === 'set-point' ? 'set-point' : 'load-disturbance';
	return {
		id,
		name: `Chien–Hrones–Reswick, ${what}, ${overshoot} % overshoot`,
		citation: CHR,
		aim:
			overshoot === 0
				? `Quickest ${what} response without overshoot.`
				: `Quickest ${what} response with 20 % overshoot.`,
		validity: 'Self-regulating processes; commonly quoted for 0.1 ≤ θ/τ ≤ 1.',
		publishedForm: 'ideal',
		controllers: ['P', 'PI', 'PID'],
		structures: ['fopdt', 'sopdt'],
		parameter: null,
		notes: 'a = K·θ/τ. SOPDT models are first reduced to FOPDT by the half rule.'
	};
}

interface Fopdt {
	k: number;
	tau: number;
	theta: number;
}

/** Validated internal view of the plant. */
interface Plant {
	structure: TuningStructure;
	k: number;
	tau: number; // fopdt τ, sopdt τ1 (larger); 0 for ipdt
	tau2: number; // sopdt τ2 (smaller); 0 otherwise
	theta: number;
}

interface RuleOutput {
	form: ControllerForm;
	kp: number;
	ti: number | null;
	td: number | null;
	warnings: string[];
}

interface Context {
	rule: TuningRuleId;
	plant: Plant;
	controller: TuningControllerType;
	parameter: number | null;
	ultimate: () => UltimateOutcome;
}

function fmt(x: number): string {
	return Number(x.toPrecision(4)).toString();
}

function validatePlant(p: TuningPlant): Plant {
	if (p === null || typeof p !== 'object') throw new TuningError('invalid-plant', 'The plant must be an object.', 'plant');
	if (!['fopdt', 'sopdt', 'ipdt'].includes(p.structure))
		throw new TuningError('invalid-plant', 'The plant structure must be fopdt, sopdt or ipdt.', 'plant.structure');
	if (typeof p.k !== 'number' || !Number.isFinite(p.k) || p.k === 0)
		throw new TuningError('invalid-plant', 'The plant gain k must be a nonzero finite number.', 'plant.k');
	if (typeof p.theta !== 'number' || !Number.isFinite(p.theta) || p.theta < 0)
		throw new TuningError('invalid-plant', 'The dead time θ must be zero or a positive number of seconds.', 'plant.theta');
	const positive = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x) && x > 0;
	if (p.structure === 'ipdt') return { structure: 'ipdt', k: p.k, tau: 0, tau2: 0, theta: p.theta };
	if (!positive(p.tau))
		throw new TuningError('invalid-plant', 'The time constant τ must be a positive number of seconds.', 'plant.tau');
	if (p.structure === 'fopdt') return { structure: 'fopdt', k: p.k, tau: p.tau, tau2: 0, theta: p.theta };
	if (!positive(p.tau2))
		throw new TuningError('invalid-plant', 'The second time constant τ2 must be a positive number of seconds.', 'plant.tau2');
	return {
		structure: 'sopdt',
		k: p.k,
		tau: Math.max(p.tau, p.tau2),
		tau2: Math.min(p.tau, p.tau2),
		theta: p.theta
	};
}

/** FOPDT view of a self-regulating plant; SOPDT via the half rule (Skogestad 2003) with a note. */
function fopdtView(ctx: Context, warnings: string[]): Fopdt {
	const p = ctx.plant;
	if (p.structure === 'fopdt') return { k: p.k, tau: p.tau, theta: p.theta };
	if (p.structure === 'sopdt') {
		const red = halfRule({ gain: p.k, lags: [p.tau, p.tau2], delay: p.theta }).fopdt;
		warnings.push(
			`Rule applied to the half-rule FOPDT approximation of the SOPDT model (τ = ${fmt(red.tau)} s, θ = ${fmt(red.theta)} s; Skogestad 2003).`
		);
		return red;
	}
	throw new TuningError('structure', `${TUNING_RULES[ctx.rule].name} is published for self-regulating processes, not for integrating (IPDT) models.`, 'plant.structure');
}

function needDelay(ctx: Context, theta: number): void {
	if (!(theta > 0))
		throw new TuningError(
			'structure',
			`${TUNING_RULES[ctx.rule].name} needs a model with dead time θ > 0 (its gains grow without bound as θ → 0).`,
			'plant.theta'
		);
}

function unsupported(ctx: Context): never {
	const info = TUNING_RULES[ctx.rule];
	throw new TuningError(
		'controller',
		`${info.name} does not publish a ${ctx.controller} controller${ctx.plant.structure === 'ipdt' ? ' for integrating models' : ''}; available: ${info.controllers.join(', ')}.`,
		'controller'
	);
}

function ratioWarning(name: string, r: number, lo: number | null, hi: number): string | null {
	if (lo !== null && r < lo)
		return `θ/τ = ${fmt(r)} is below the range commonly advised for ${name} (${lo}–${hi}); expect a poorly damped or over-aggressive loop.`;
	if (r > hi)
		return `θ/τ = ${fmt(r)} is above the range commonly advised for ${name} (${lo === null ? 'up to ' + hi : lo + '–' + hi}); the rule becomes unreliable for dead-time-dominant loops.`;
	return null;
}

function ultimateOrThrow(ctx: Context): { ku: number; pu: number; wu: number } {
	const u = ctx.ultimate();
	if (!u.ok) throw new TuningError('no-ultimate', `${TUNING_RULES[ctx.rule].name} needs a finite ultimate gain: ${u.reason}`, 'plant.theta');
	return u;
}

function parameterOr(ctx: Context, fallback: number, symbol: string): number {
	const value = ctx.parameter ?? fallback;
	if (!(Number.isFinite(value) && value > 0)) {
		throw new TuningError(
			'parameter',
			ctx.parameter === null
				? `The default ${symbol} is zero for this model (no dead time); give ${symbol} in seconds.`
				: `${symbol} must be a positive number of seconds.`,
			'parameter'
		);
	}
	return value;
}

type RuleFn = (ctx: Context) => RuleOutput;

/** Ziegler & Nichols 1942, reaction-curve table: P 1/a; PI 0.9/a, θ/0.3; PID 1.2/a, 2θ, θ/2. */
const znStep: RuleFn = (ctx) => {
	const warnings: string[] = [];
	let a: number;
	let L: number;
	if (ctx.plant.structure === 'ipdt') {
		L = ctx.plant.theta;
		needDelay(ctx, L);
		a = ctx.plant.k * L;
	} else {
		const m = fopdtView(ctx, warnings);
		L = m.theta;
		needDelay(ctx, L);
		a = (m.k * L) / m.tau;
		const w = ratioWarning('Ziegler–Nichols', L / m.tau, 0.1, 1);
		if (w) warnings.push(w);
	}
	switch (ctx.controller) {
		case 'P':
			return { form: 'ideal', kp: 1 / a, ti: null, td: null, warnings };
		case 'PI':
			return { form: 'ideal', kp: 0.9 / a, ti: L / 0.3, td: null, warnings };
		case 'PID':
			return { form: 'ideal', kp: 1.2 / a, ti: 2 * L, td: 0.5 * L, warnings };
		default:
			return unsupported(ctx);
	}
};

/** Ziegler & Nichols 1942, ultimate-gain table: P 0.5Ku; PI 0.45Ku, Pu/1.2; PID 0.6Ku, Pu/2, Pu/8. */
const znUltimate: RuleFn = (ctx) => {
	if (!['P', 'PI', 'PID'].includes(ctx.controller)) unsupported(ctx);
	const { ku, pu } = ultimateOrThrow(ctx);
	const warnings: string[] = [];
	switch (ctx.controller) {
		case 'P':
			return { form: 'ideal', kp: 0.5 * ku, ti: null, td: null, warnings };
		case 'PI':
			return { form: 'ideal', kp: 0.45 * ku, ti: pu / 1.2, td: null, warnings };
		default:
			return { form: 'ideal', kp: 0.6 * ku, ti: pu / 2, td: pu / 8, warnings };
	}
};

/**
 * Cohen & Coon 1953 with r = θ/τ and Kc·K·r = P: 1 + r/3; PI: 0.9 + r/12, Ti = θ(30+3r)/(9+20r);
 * PD: 1.25 + r/6, Td = θ(6−2r)/(22+3r); PID: 4/3 + r/4, Ti = θ(32+6r)/(13+8r), Td = 4θ/(11+2r).
 * The PI gain factor is pinned to 0.9 + r/12 (Seborg, Edgar & Mellichamp, Process Dynamics and
 * Control, tuning-relations table); sources disagree: one handbook table (Liptak, Instrument
 * Engineers' Handbook) prints 1.1 + r/12.
 */
const cohenCoon: RuleFn = (ctx) => {
	const warnings: string[] = [];
	const m = fopdtView(ctx, warnings);
	needDelay(ctx, m.theta);
	const r = m.theta / m.tau;
	const base = m.tau / (m.k * m.theta);
	const w = ratioWarning('Cohen–Coon', r, null, 1);
	if (w) warnings.push(w);
	switch (ctx.controller) {
		case 'P':
			return { form: 'ideal', kp: base * (1 + r / 3), ti: null, td: null, warnings };
		case 'PI':
			return { form: 'ideal', kp: base * (0.9 + r / 12), ti: (m.theta * (30 + 3 * r)) / (9 + 20 * r), td: null, warnings };
		case 'PD': {
			const td = (m.theta * (6 - 2 * r)) / (22 + 3 * r);
			if (!(td > 0))
				throw new TuningError('structure', `Cohen–Coon PD gives a negative derivative time for θ/τ = ${fmt(r)} ≥ 3.`, 'plant.theta');
			return { form: 'ideal', kp: base * (1.25 + r / 6), ti: null, td, warnings };
		}
		default:
			return {
				form: 'ideal',
				kp: base * (4 / 3 + r / 4),
				ti: (m.theta * (32 + 6 * r)) / (13 + 8 * r),
				td: (4 * m.theta) / (11 + 2 * r),
				warnings
			};
	}
};

/** CHR table (Chien, Hrones & Reswick 1952, as tabulated by Åström & Hägglund 1995): a = Kθ/τ. */
const CHR_TABLE: Record<string, { P: number; PI: [number, number, 'T' | 'L']; PID: [number, number, 'T' | 'L', number] }> = {
	'chr-setpoint-0': { P: 0.3, PI: [0.35, 1.2, 'T'], PID: [0.6, 1, 'T', 0.5] },
	'chr-setpoint-20': { P: 0.7, PI: [0.6, 1, 'T'], PID: [0.95, 1.4, 'T', 0.47] },
	'chr-load-0': { P: 0.3, PI: [0.6, 4, 'L'], PID: [0.95, 2.4, 'L', 0.42] },
	'chr-load-20': { P: 0.7, PI: [0.7, 2.3, 'L'], PID: [1.2, 2, 'L', 0.42] }
};

const chr: RuleFn = (ctx) => {
	const warnings: string[] = [];
	const m = fopdtView(ctx, warnings);
	needDelay(ctx, m.theta);
	const row = CHR_TABLE[ctx.rule];
	const a = (m.k * m.theta) / m.tau;
	const w = ratioWarning('Chien–Hrones–Reswick', m.theta / m.tau, 0.1, 1);
	if (w) warnings.push(w);
	const time = (which: 'T' | 'L') => (which === 'T' ? m.tau : m.theta);
	switch (ctx.controller) {
		case 'P':
			return { form: 'ideal', kp: row.P / a, ti: null, td: null, warnings };
		case 'PI':
			return { form: 'ideal', kp: row.PI[0] / a, ti: row.PI[1] * time(row.PI[2]), td: null, warnings };
		case 'PID':
			return {
				form: 'ideal',
				kp: row.PID[0] / a,
				ti: row.PID[1] * time(row.PID[2]),
				td: row.PID[3] * m.theta,
				warnings
			};
		default:
			return unsupported(ctx);
	}
};

/** Default λ of the IMC rule: PID max(0.8θ, 0.2τ), PI max(1.7θ, 0.2τ) (Rivera et al. 1986 recommendations). */
function imcDefault(m: Fopdt, controller: TuningControllerType): number {
	return controller === 'PID' ? Math.max(0.8 * m.theta, 0.2 * m.tau) : Math.max(1.7 * m.theta, 0.2 * m.tau);
}

/** IMC-PID with the first-order Padé delay: Kc = (2τ+θ)/(K(2λ+θ)), Ti = τ + θ/2, Td = τθ/(2τ+θ). */
function imcPid(m: Fopdt, lambda: number): { kp: number; ti: number; td: number } {
	return {
		kp: (2 * m.tau + m.theta) / (m.k * (2 * lambda + m.theta)),
		ti: m.tau + m.theta / 2,
		td: (m.tau * m.theta) / (2 * m.tau + m.theta)
	};
}

/**
 * Rivera, Morari & Skogestad 1986 (table of IMC-based PID settings, from memory):
 * PI Kc = τ/(Kλ), Ti = τ — the delay is left out of the model the controller is built on, hence
 * the recommendation λ/θ > 1.7; PID (first-order Padé delay, without the extra lag filter)
 * Kc = (2τ+θ)/(K(2λ+θ)), Ti = τ+θ/2, Td = τθ/(2τ+θ), with λ/θ > 0.8 and λ > 0.2τ.
 * The Taylor-delay PI τ/(K(λ+θ)) of Seborg, Edgar & Mellichamp is the 'lambda' rule here.
 */
const imc: RuleFn = (ctx) => {
	if (ctx.controller !== 'PI' && ctx.controller !== 'PID') unsupported(ctx);
	const warnings: string[] = [];
	const m = fopdtView(ctx, warnings);
	const lambda = parameterOr(ctx, imcDefault(m, ctx.controller), 'λ');
	if (ctx.controller === 'PI') {
		if (m.theta > 0 && clearlyBelow(lambda, 1.7 * m.theta))
			warnings.push(`λ/θ = ${fmt(lambda / m.theta)} is below the 1.7 recommended for IMC PI; expect poor robustness.`);
		return { form: 'ideal', kp: m.tau / (m.k * lambda), ti: m.tau, td: null, warnings };
	}
	if (m.theta > 0 && clearlyBelow(lambda, 0.8 * m.theta))
		warnings.push(`λ/θ = ${fmt(lambda / m.theta)} is below the 0.8 recommended for IMC PID; expect poor robustness.`);
	if (clearlyBelow(lambda, 0.2 * m.tau)) warnings.push(`λ = ${fmt(lambda)} s is below 0.2·τ = ${fmt(0.2 * m.tau)} s recommended for IMC PID.`);
	return { form: 'ideal', ...imcPid(m, lambda), warnings };
};

/**
 * a < b beyond rounding (relative 1e-9): a design parameter set exactly at a recommended bound
 * (the defaults are) must not warn because λ = 0.8·θ came out one ulp low.
 */
function clearlyBelow(a: number, b: number): boolean {
	return a < b * (1 - 1e-9);
}

/**
 * Skogestad 2003 (SIMC), default τc = θ: FOPDT PI Kc = τ1/(k(τc+θ)), Ti = min(τ1, 4(τc+θ));
 * SOPDT PID (series) the same with Td = τ2; IPDT PI Kc = 1/(k′(τc+θ)), Ti = 4(τc+θ).
 * PI on an SOPDT model uses the half-rule FOPDT (and its effective delay for the default τc).
 */
const simc: RuleFn = (ctx) => {
	if (ctx.controller !== 'PI' && ctx.controller !== 'PID') unsupported(ctx);
	const p = ctx.plant;
	const warnings: string[] = [];
	const closedLoopTime = (theta: number): number => {
		const tc = parameterOr(ctx, theta, 'τc');
		if (clearlyBelow(tc, theta))
			warnings.push(`τc = ${fmt(tc)} s is below the minimum recommended τc = θ = ${fmt(theta)} s; robustness drops.`);
		return tc;
	};
	if (p.structure === 'ipdt') {
		if (ctx.controller !== 'PI') unsupported(ctx);
		const tc = closedLoopTime(p.theta);
		return { form: 'ideal', kp: 1 / (p.k * (tc + p.theta)), ti: 4 * (tc + p.theta), td: null, warnings };
	}
	if (ctx.controller === 'PID') {
		if (p.structure !== 'sopdt')
			throw new TuningError(
				'structure',
				'SIMC PID takes its derivative time from the second time constant (Td = τ2): give an SOPDT model, or use PI.',
				'plant.structure'
			);
		const tc = closedLoopTime(p.theta);
		if (p.tau2 < p.theta)
			warnings.push(
				`τ2 = ${fmt(p.tau2)} s is smaller than θ = ${fmt(p.theta)} s: SIMC advises derivative action (a second-order model) only when τ2 is larger than about θ.`
			);
		return {
			form: 'series',
			kp: p.tau / (p.k * (tc + p.theta)),
			ti: Math.min(p.tau, 4 * (tc + p.theta)),
			td: p.tau2,
			warnings
		};
	}
	const m = fopdtView(ctx, warnings);
	const tc = closedLoopTime(m.theta);
	return {
		form: 'ideal',
		kp: m.tau / (m.k * (tc + m.theta)),
		ti: Math.min(m.tau, 4 * (tc + m.theta)),
		td: null,
		warnings
	};
};

/**
 * Lambda tuning (Dahlin 1968; Åström & Hägglund 2006): FOPDT PI Kc = τ/(K(λ+θ)), Ti = τ
 * (default λ = τ); PID = IMC-PID Padé row with λ; IPDT PI Kc = (2λ+θ)/(Kv(λ+θ)²), Ti = 2λ+θ
 * (default λ = 2θ). λ ≥ θ advised.
 */
const lambdaRule: RuleFn = (ctx) => {
	if (ctx.controller !== 'PI' && ctx.controller !== 'PID') unsupported(ctx);
	const p = ctx.plant;
	const warnings: string[] = [];
	if (p.structure === 'ipdt') {
		if (ctx.controller !== 'PI') unsupported(ctx);
		const lambda = parameterOr(ctx, 2 * p.theta, 'λ');
		if (lambda < p.theta) warnings.push(`λ = ${fmt(lambda)} s is below θ = ${fmt(p.theta)} s; robustness is poor.`);
		return {
			form: 'ideal',
			kp: (2 * lambda + p.theta) / (p.k * (lambda + p.theta) ** 2),
			ti: 2 * lambda + p.theta,
			td: null,
			warnings
		};
	}
	const m = fopdtView(ctx, warnings);
	const lambda = parameterOr(ctx, m.tau, 'λ');
	if (lambda < m.theta) warnings.push(`λ = ${fmt(lambda)} s is below θ = ${fmt(m.theta)} s; robustness is poor.`);
	if (ctx.controller === 'PI') return { form: 'ideal', kp: m.tau / (m.k * (lambda + m.theta)), ti: m.tau, td: null, warnings };
	return { form: 'ideal', ...imcPid(m, lambda), warnings };
};

/**
 * AMIGO (Åström & Hägglund 2004; Advanced PID Control 2006, ch. 7), T = τ, L = θ:
 * PI Kc = 0.15/K + (0.35 − LT/(L+T)²)·T/(KL), Ti = 0.35L + 13LT²/(T² + 12LT + 7L²);
 * PID Kc = (0.2 + 0.45T/L)/K, Ti = L(0.4L + 0.8T)/(L + 0.1T), Td = 0.5LT/(0.3L + T);
 * IPDT PI 0.35/(KvL), 13.4L; PID 0.45/(KvL), 8L, 0.5L.
 */
const amigo: RuleFn = (ctx) => {
	if (ctx.controller !== 'PI' && ctx.controller !== 'PID') unsupported(ctx);
	const p = ctx.plant;
	const warnings: string[] = [];
	if (p.structure === 'ipdt') {
		needDelay(ctx, p.theta);
		const L = p.theta;
		if (ctx.controller === 'PI') return { form: 'ideal', kp: 0.35 / (p.k * L), ti: 13.4 * L, td: null, warnings };
		return { form: 'ideal', kp: 0.45 / (p.k * L), ti: 8 * L, td: 0.5 * L, warnings };
	}
	const m = fopdtView(ctx, warnings);
	needDelay(ctx, m.theta);
	const L = m.theta;
	const T = m.tau;
	if (ctx.controller === 'PI') {
		return {
			form: 'ideal',
			kp: 0.15 / m.k + ((0.35 - (L * T) / (L + T) ** 2) * T) / (m.k * L),
			ti: 0.35 * L + (13 * L * T * T) / (T * T + 12 * L * T + 7 * L * L),
			td: null,
			warnings
		};
	}
	const tauN = L / (L + T);
	if (tauN < 0.5)
		warnings.push(
			`Normalised dead time θ/(θ+τ) = ${fmt(tauN)} is small (lag-dominated): AMIGO PID from a first-order model is conservative here; a better model is advised.`
		);
	return {
		form: 'ideal',
		kp: (0.2 + (0.45 * T) / L) / m.k,
		ti: (L * (0.4 * L + 0.8 * T)) / (L + 0.1 * T),
		td: (0.5 * L * T) / (0.3 * L + T),
		warnings
	};
};

/**
 * Tyreus & Luyben 1992: PI Ku/3.2, 2.2Pu; PID Ku/2.2, 2.2Pu, Pu/6.3. For PID on an IPDT model,
 * Luyben 1996: Kc = 0.46Ku, Td = 1/ωu (abstract), with Ti = 2.2Pu from the Tyreus–Luyben table.
 */
const tyreusLuyben: RuleFn = (ctx) => {
	if (ctx.controller !== 'PI' && ctx.controller !== 'PID') unsupported(ctx);
	const { ku, pu, wu } = ultimateOrThrow(ctx);
	const warnings: string[] = [];
	if (ctx.controller === 'PI') return { form: 'ideal', kp: ku / 3.2, ti: 2.2 * pu, td: null, warnings };
	if (ctx.plant.structure === 'ipdt') {
		warnings.push(
			'Luyben (1996) settings for integrator/dead-time processes: the loop is conditionally stable (unstable at too low as well as too high gain).'
		);
		return { form: 'ideal', kp: 0.46 * ku, ti: 2.2 * pu, td: 1 / wu, warnings };
	}
	return { form: 'ideal', kp: ku / 2.2, ti: 2.2 * pu, td: pu / 6.3, warnings };
};

const RULE_FUNCTIONS: Record<TuningRuleId, RuleFn> = {
	'zn-step': znStep,
	'zn-ultimate': znUltimate,
	'cohen-coon': cohenCoon,
	'chr-setpoint-0': chr,
	'chr-setpoint-20': chr,
	'chr-load-0': chr,
	'chr-load-20': chr,
	imc,
	simc,
	lambda: lambdaRule,
	amigo,
	'tyreus-luyben': tyreusLuyben
};

function ultimateOf(plant: Plant): () => UltimateOutcome {
	let cached: UltimateOutcome | null = null;
	return () => {
		if (cached) return cached;
		if (plant.structure === 'ipdt') cached = ultimateIpdt(plant.k, plant.theta);
		else if (plant.structure === 'fopdt') cached = ultimateFopdt(plant.k, plant.tau, plant.theta);
		else cached = ultimateSopdt(plant.k, plant.tau, plant.tau2, plant.theta);
		return cached;
	};
}

function finiteOrNull(x: number | null): boolean {
	return x === null || Number.isFinite(x);
}

function run(rule: TuningRuleId, plant: Plant, controller: TuningControllerType, parameter: number | null, ultimate: () => UltimateOutcome): TuningResult {
	const info = TUNING_RULES[rule];
	const ctx: Context = { rule, plant, controller, parameter, ultimate };
	if (!info.structures.includes(plant.structure)) {
		throw new TuningError(
			'structure',
			`${info.name} does not apply to ${plant.structure.toUpperCase()} models: ${plant.structure === 'ipdt' ? 'it is published for self-regulating processes' : 'it needs a different model'}.`,
			'plant.structure'
		);
	}
	if (!info.controllers.includes(controller)) unsupported(ctx);
	const out = RULE_FUNCTIONS[rule](ctx);
	const published = { form: out.form, kp: out.kp, ti: out.ti, td: out.td };
	let ideal: TuningGains = { kp: out.kp, ti: out.ti, td: out.td };
	if (out.form === 'series') {
		const conv = seriesToIdeal(ideal);
		if (!conv.ok) throw new TuningError('rule', conv.reason, null);
		ideal = conv.value;
	}
	const all = [published.kp, published.ti, published.td, ideal.kp, ideal.ti, ideal.td];
	if (!all.every(finiteOrNull) || !(ideal.ti === null || ideal.ti > 0) || !(ideal.td === null || ideal.td >= 0)) {
		throw new TuningError('rule', `${info.name} gives no usable setting for this model.`, null);
	}
	return { rule, controller, ideal, published, warnings: out.warnings };
}

function validateRequest(req: TuningRequest): { plant: Plant; parameter: number | null } {
	if (req === null || typeof req !== 'object') throw new TuningError('invalid-plant', 'The request must be an object.', null);
	if (!TUNING_RULE_IDS.includes(req.rule)) throw new TuningError('rule', `Unknown tuning rule "${String(req.rule)}".`, 'rule');
	if (!['P', 'PI', 'PD', 'PID'].includes(req.controller))
		throw new TuningError('controller', 'The controller must be P, PI, PD or PID.', 'controller');
	const plant = validatePlant(req.plant);
	const parameter = req.parameter ?? null;
	if (parameter !== null && !(typeof parameter === 'number' && Number.isFinite(parameter) && parameter > 0))
		throw new TuningError('parameter', 'The rule parameter (τc or λ) must be a positive number of seconds.', 'parameter');
	return { plant, parameter };
}

/**
 * Applies one tuning rule (Tuning contract of the product brief): settings in the published form
 * and in ideal form (seconds; Kp in 1/plant-gain units), with validity warnings. Throws
 * TuningError (with the request field) when the request is invalid or the rule does not apply.
 */
export function tune(request: TuningRequest): TuningResult {
	const { plant, parameter } = validateRequest(request);
	return run(request.rule, plant, request.controller, parameter, ultimateOf(plant));
}

/** One row of the bench's rule table: the result, or the reason the rule does not apply. */
export type TuningTableRow =
	| { rule: TuningRuleId; name: string; result: TuningResult; reason: null }
	| { rule: TuningRuleId; name: string; result: null; reason: string };

/**
 * Every rule for one plant and controller type, with default parameters, in TUNING_RULE_IDS
 * order; rules that do not apply carry the reason. Ku/Pu is computed once. Throws TuningError
 * only for an invalid plant or controller.
 */
export function tuneAll(plant: TuningPlant, controller: TuningControllerType): TuningTableRow[] {
	const valid = validateRequest({ plant, rule: 'zn-step', controller }).plant;
	const ultimate = ultimateOf(valid);
	return TUNING_RULE_IDS.map((rule): TuningTableRow => {
		const name = TUNING_RULES[rule].name;
		try {
			return { rule, name, result: run(rule, valid, controller, null, ultimate), reason: null };
		} catch (e) {
			if (e instanceof TuningError) return { rule, name, result: null, reason: e.message };
			throw e;
		}
	});
}

/**
 * The parameter (τc or λ, seconds) a rule uses when none is given, or null when the rule has
 * none or it does not apply. SIMC: θ (of the half-rule FOPDT for SOPDT PI); IMC: see imcDefault;
 * lambda: τ (self-regulating) or 2θ (integrating).
 */
export function defaultRuleParameter(rule: TuningRuleId, plant: TuningPlant, controller: TuningControllerType): number | null {
	let p: Plant;
	try {
		p = validatePlant(plant);
	} catch {
		return null;
	}
	const reduced = (): Fopdt =>
		p.structure === 'sopdt' ? halfRule({ gain: p.k, lags: [p.tau, p.tau2], delay: p.theta }).fopdt : { k: p.k, tau: p.tau, theta: p.theta };
	switch (rule) {
		case 'simc':
			return p.structure === 'sopdt' && controller === 'PI' ? reduced().theta : p.theta;
		case 'imc':
			return p.structure === 'ipdt' ? null : imcDefault(reduced(), controller);
		case 'lambda':
			return p.structure === 'ipdt' ? 2 * p.theta : reduced().tau;
		default:
			return null;
	}
}
