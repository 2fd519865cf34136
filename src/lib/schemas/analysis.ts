/**
 * Request schema of the loop analysis (POST /api/v1/analysis and the bench form), zod 4.
 * Pure: usable on the server and in components. Seconds, rad/s.
 *
 * Leading zero coefficients of num/den are trimmed (not rejected): [0, 1, 2] is s + 2. After
 * trimming, the denominator must not be zero, its degree must be at most 20 and not below the
 * numerator's (proper plant). Non-zero coefficients must lie within 1e-30…1e30 in magnitude
 * (outside that range the model is a units mistake, and the arithmetic would overflow).
 */
import { z } from 'zod';
import type { AnalysisRequest } from '../control/analyze';

/** A failed parse reduced to one message and the dotted path of the field (null for the whole body). */
export interface AnalysisSchemaIssue {
	error: string;
	field: string | null;
}

const finite = (label: string) => z.number({ error: `${label} must be a finite number` });

const coefficients = (label: string) =>
	z
		.array(finite(label), { error: `${label} must be a list of numbers (descending powers of s)` })
		.min(1, `${label} must have at least one coefficient`)
		.max(64, `${label} has too many coefficients`);

const trimLeading = (p: number[]) => {
	let i = 0;
	while (i < p.length && p[i] === 0) i++;
	return p.slice(i);
};

const MAX_ORDER = 20;

/** Plant num/den (descending powers of s) and optional dead time (s); see the module comment. */
export const analysisPlantSchema = z
	.object(
		{
			num: coefficients('plant.num'),
			den: coefficients('plant.den'),
			delay: finite('plant.delay').min(0, 'plant.delay must be zero or positive (seconds)').max(1e6, 'plant.delay must be at most 1e6 s').optional()
		},
		{ error: 'plant must be an object with num and den' }
	)
	.superRefine((p, ctx) => {
		const num = trimLeading(p.num);
		const den = trimLeading(p.den);
		const range = (c: number) => c === 0 || (Math.abs(c) >= 1e-30 && Math.abs(c) <= 1e30);
		if (den.length === 0) ctx.addIssue({ code: 'custom', message: 'plant.den must not be zero (all coefficients are 0)', path: ['den'] });
		else if (den.length - 1 > MAX_ORDER) ctx.addIssue({ code: 'custom', message: `plant.den: the order ${den.length - 1} is above the limit of ${MAX_ORDER}`, path: ['den'] });
		else if (!den.every(range)) ctx.addIssue({ code: 'custom', message: 'plant.den: non-zero coefficients must lie between 1e-30 and 1e30 in magnitude', path: ['den'] });
		if (num.length === 0) ctx.addIssue({ code: 'custom', message: 'plant.num must not be zero (all coefficients are 0)', path: ['num'] });
		else if (den.length > 0 && num.length > den.length)
			ctx.addIssue({ code: 'custom', message: 'plant.num: the plant is improper (numerator degree above denominator degree)', path: ['num'] });
		else if (!num.every(range)) ctx.addIssue({ code: 'custom', message: 'plant.num: non-zero coefficients must lie between 1e-30 and 1e30 in magnitude', path: ['num'] });
	})
	.transform((p) => ({ num: trimLeading(p.num), den: trimLeading(p.den), delay: p.delay ?? 0 }));

const gainLimit = 1e9;

/** Controller type, form and settings (ti, td in s; ki in 1/s; kd in s; n dimensionless). */
export const analysisControllerSchema = z
	.object(
		{
			type: z.enum(['P', 'PI', 'PD', 'PID'], { error: 'controller.type must be P, PI, PD or PID' }),
			form: z.enum(['ideal', 'series', 'parallel'], { error: 'controller.form must be ideal, series or parallel' }).optional(),
			kp: finite('controller.kp')
				.refine((v) => v !== 0, 'controller.kp must not be zero')
				.refine((v) => Math.abs(v) <= gainLimit, 'controller.kp must be at most 1e9 in magnitude'),
			ti: finite('controller.ti')
				.positive('controller.ti must be greater than zero (seconds)')
				.min(1e-6, 'controller.ti must be at least 1e-6 s')
				.max(1e9, 'controller.ti must be at most 1e9 s')
				.nullish(),
			td: finite('controller.td')
				.min(0, 'controller.td must be zero or positive (seconds)')
				.max(1e9, 'controller.td must be at most 1e9 s')
				.refine((v) => v === 0 || v >= 1e-6, 'controller.td must be 0 or at least 1e-6 s')
				.nullish(),
			n: finite('controller.n').positive('controller.n must be greater than zero (omit it for an ideal derivative)').max(1e6, 'controller.n must be at most 1e6').nullish(),
			ki: finite('controller.ki').refine((v) => Math.abs(v) <= gainLimit, 'controller.ki must be at most 1e9 in magnitude').nullish(),
			kd: finite('controller.kd').refine((v) => Math.abs(v) <= gainLimit, 'controller.kd must be at most 1e9 in magnitude').nullish(),
			b: finite('controller.b').min(-100, 'controller.b must be between -100 and 100').max(100, 'controller.b must be between -100 and 100').nullish(),
			c: finite('controller.c').min(-100, 'controller.c must be between -100 and 100').max(100, 'controller.c must be between -100 and 100').nullish()
		},
		{ error: 'controller must be an object with type and kp' }
	)
	.superRefine((c, ctx) => {
		const form = c.form ?? 'ideal';
		const hasI = c.type === 'PI' || c.type === 'PID';
		const hasD = c.type === 'PD' || c.type === 'PID';
		const missing = (field: string, message: string) => ctx.addIssue({ code: 'custom', message, path: [field] });
		if (form === 'parallel') {
			if (hasI && (c.ki === undefined || c.ki === null)) missing('ki', 'controller.ki is required for a parallel PI/PID (1/s)');
			if (hasD && (c.kd === undefined || c.kd === null)) missing('kd', 'controller.kd is required for a parallel PD/PID (s)');
			if (hasI && typeof c.ki === 'number' && c.ki * c.kp < 0) missing('ki', 'controller.ki must have the same sign as kp (or be 0)');
			if (hasD && typeof c.kd === 'number' && c.kd * c.kp < 0) missing('kd', 'controller.kd must have the same sign as kp (or be 0)');
			if (hasI && typeof c.ki === 'number' && Math.abs(c.ki) > 1e6 * Math.abs(c.kp)) missing('ki', 'controller.ki must be at most 1e6·|kp| (an integral time of at least 1 µs)');
			if (hasD && typeof c.kd === 'number' && c.kd !== 0 && Math.abs(c.kd) < 1e-6 * Math.abs(c.kp))
				missing('kd', 'controller.kd must be 0 or at least 1e-6·|kp| (a derivative time of at least 1 µs)');
		} else {
			if (hasI && (c.ti === undefined || c.ti === null)) missing('ti', 'controller.ti is required for PI and PID (seconds)');
			if (hasD && (c.td === undefined || c.td === null)) missing('td', 'controller.td is required for PD and PID (seconds)');
		}
	});

/** Numerical options: tEnd (s), points, settling band (fraction), Padé order, Bode points. */
export const analysisOptionsSchema = z
	.object(
		{
			tEnd: finite('options.tEnd').positive('options.tEnd must be greater than zero (seconds)').max(1e9, 'options.tEnd must be at most 1e9 s').optional(),
			points: z.int({ error: 'options.points must be a whole number' }).min(10, 'options.points must be at least 10').max(20000, 'options.points must be at most 20000').optional(),
			settlingBand: finite('options.settlingBand').positive('options.settlingBand must be greater than zero').max(0.5, 'options.settlingBand must be at most 0.5').optional(),
			padeOrder: z.int({ error: 'options.padeOrder must be a whole number' }).min(1, 'options.padeOrder must be at least 1').max(10, 'options.padeOrder must be at most 10').optional(),
			bodePoints: z.int({ error: 'options.bodePoints must be a whole number' }).min(16, 'options.bodePoints must be at least 16').max(5000, 'options.bodePoints must be at most 5000').optional()
		},
		{ error: 'options must be an object' }
	)
	.optional();

const percent = (label: string, max: number) => finite(label).min(0, `${label} must be zero or positive (percent)`).max(max, `${label} must be at most ${max} %`).optional();
const levels = (label: string) => z.int({ error: `${label} must be a whole number` }).min(2, `${label} must be at least 2`).max(10, `${label} must be at most 10`).optional();

/** Optional robustness grid: ± gain %, + dead time %, ± time constants %, and levels per factor. */
export const analysisUncertaintySchema = z
	.object(
		{
			gainPercent: percent('uncertainty.gainPercent', 99),
			delayPercent: percent('uncertainty.delayPercent', 1000),
			timeConstantPercent: percent('uncertainty.timeConstantPercent', 99),
			gainLevels: levels('uncertainty.gainLevels'),
			delayLevels: levels('uncertainty.delayLevels'),
			timeConstantLevels: levels('uncertainty.timeConstantLevels')
		},
		{ error: 'uncertainty must be an object' }
	)
	.optional();

/** Optional pole sweep of one controller parameter. */
export const analysisSweepSchema = z
	.object(
		{
			parameter: z.enum(['kp', 'ti', 'td', 'ki', 'kd'], { error: 'sweep.parameter must be kp, ti, td, ki or kd' }),
			from: finite('sweep.from'),
			to: finite('sweep.to'),
			count: z.int({ error: 'sweep.count must be a whole number' }).min(2, 'sweep.count must be at least 2').max(1000, 'sweep.count must be at most 1000').optional(),
			scale: z.enum(['log', 'linear'], { error: 'sweep.scale must be log or linear' }).optional()
		},
		{ error: 'sweep must be an object' }
	)
	.superRefine((s, ctx) => {
		if ((s.scale ?? 'log') === 'log') {
			if (!(s.from > 0)) ctx.addIssue({ code: 'custom', message: 'sweep.from must be greater than zero on a log scale', path: ['from'] });
			if (!(s.to > 0)) ctx.addIssue({ code: 'custom', message: 'sweep.to must be greater than zero on a log scale', path: ['to'] });
		}
		if (s.parameter === 'ti' && !(s.from > 0 && s.to > 0)) ctx.addIssue({ code: 'custom', message: 'sweep: ti must stay greater than zero', path: ['from'] });
		if (s.parameter === 'td' && !(s.from >= 0 && s.to >= 0)) ctx.addIssue({ code: 'custom', message: 'sweep: td must stay zero or positive', path: ['from'] });
	})
	.optional();

/** The whole analysis request (Analysis API contract plus optional uncertainty and sweep). */
export const analysisRequestSchema = z
	.object(
		{
			plant: analysisPlantSchema,
			controller: analysisControllerSchema,
			options: analysisOptionsSchema,
			uncertainty: analysisUncertaintySchema,
			sweep: analysisSweepSchema
		},
		{ error: 'The request body must be a JSON object' }
	)
	.superRefine((r, ctx) => {
		// An ideal derivative on a plant with direct feedthrough gives an improper loop.
		const c = r.controller;
		const hasD = c.type === 'PD' || c.type === 'PID';
		const derivative = (c.form ?? 'ideal') === 'parallel' ? (c.kd ?? 0) !== 0 : (c.td ?? 0) > 0;
		if (hasD && derivative && (c.n === undefined || c.n === null) && r.plant.num.length === r.plant.den.length)
			ctx.addIssue({
				code: 'custom',
				message: 'controller.n is required: an ideal derivative on a plant with as many zeros as poles makes the loop improper',
				path: ['controller', 'n']
			});
		if (r.sweep) {
			const form = c.form ?? 'ideal';
			const allowed = form === 'parallel' ? ['kp', 'ki', 'kd'] : ['kp', 'ti', 'td'];
			if (!allowed.includes(r.sweep.parameter))
				ctx.addIssue({ code: 'custom', message: `sweep.parameter must be one of ${allowed.join(', ')} for the ${form} form`, path: ['sweep', 'parameter'] });
			const needs: Record<string, string[]> = { ti: ['PI', 'PID'], ki: ['PI', 'PID'], td: ['PD', 'PID'], kd: ['PD', 'PID'], kp: ['P', 'PI', 'PD', 'PID'] };
			if (!needs[r.sweep.parameter].includes(c.type))
				ctx.addIssue({ code: 'custom', message: `sweep.parameter: a ${c.type} controller has no ${r.sweep.parameter}`, path: ['sweep', 'parameter'] });
		}
	});

/** The first issue of a zod error as `{ error, field }` (field as a dotted path such as 'plant.den'). */
export function analysisIssue(error: z.ZodError): AnalysisSchemaIssue {
	const issue = error.issues[0];
	const field = issue && issue.path.length ? issue.path.map(String).join('.') : null;
	return { error: issue ? issue.message : 'The request is not valid.', field };
}

/** Parses an analysis request body; on failure returns the first issue with the field named. */
export function parseAnalysisRequest(body: unknown): { ok: true; data: AnalysisRequest } | ({ ok: false } & AnalysisSchemaIssue) {
	const parsed = analysisRequestSchema.safeParse(body);
	if (!parsed.success) return { ok: false, ...analysisIssue(parsed.error) };
	return { ok: true, data: parsed.data as AnalysisRequest };
}
