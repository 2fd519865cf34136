/**
 * Request schema of the tuning calculation (POST /api/v1/tuning and the bench's rule picker).
 * Pure: usable on the server and in components. Times in seconds.
 */
import { z } from 'zod';
import { TUNING_RULE_IDS, type TuningRequest } from '../control/tuning';

/** A failed parse reduced to one message and the dotted path of the field (null for the whole body). */
export interface SchemaIssue {
	error: string;
	field: string | null;
}

/** The first issue of a zod error as `{ error, field }`, field as a dotted path ('plant.tau'). */
export function firstIssue(error: z.ZodError): SchemaIssue {
	const issue = error.issues[0];
	const field = issue && issue.path.length ? issue.path.map(String).join('.') : null;
	return { error: issue ? issue.message : 'The request is not valid.', field };
}

/** A finite number (NaN, ±Infinity and strings rejected) with a message naming the field. */
export function finiteNumber(label: string) {
	return z.number({ error: `${label} must be a finite number` });
}

/** Seconds > 0. */
export function positiveSeconds(label: string) {
	return finiteNumber(label).positive(`${label} must be greater than zero (seconds)`);
}

/** Seconds ≥ 0. */
export function nonNegativeSeconds(label: string) {
	return finiteNumber(label).min(0, `${label} must be zero or positive (seconds)`);
}

/** Nonzero finite gain. */
export function plantGain(label: string) {
	return finiteNumber(label).refine((v) => v !== 0, `${label} must not be zero`);
}

const fopdt = z.object({
	structure: z.literal('fopdt'),
	k: plantGain('plant.k'),
	tau: positiveSeconds('plant.tau'),
	theta: nonNegativeSeconds('plant.theta')
});

const sopdt = z.object({
	structure: z.literal('sopdt'),
	k: plantGain('plant.k'),
	tau: positiveSeconds('plant.tau'),
	tau2: positiveSeconds('plant.tau2'),
	theta: nonNegativeSeconds('plant.theta')
});

const ipdt = z.object({
	structure: z.literal('ipdt'),
	k: plantGain('plant.k'),
	theta: nonNegativeSeconds('plant.theta')
});

/** Plant of a tuning request: FOPDT (k, tau, theta), SOPDT (k, tau, tau2, theta) or IPDT (k = Kv, theta). */
export const tuningPlantSchema = z.discriminatedUnion('structure', [fopdt, sopdt, ipdt], {
	error: (issue) =>
		issue.input === undefined || issue.input === null || typeof issue.input !== 'object'
			? 'plant must be an object with structure, k and theta'
			: 'plant.structure must be fopdt, sopdt or ipdt'
});

/** Tuning request (Tuning contract): plant, rule, controller (P, PI, PD, PID), optional τc/λ in seconds. */
export const tuningRequestSchema = z.object(
	{
		plant: tuningPlantSchema,
		rule: z.enum(TUNING_RULE_IDS as [string, ...string[]], {
			error: `rule must be one of ${TUNING_RULE_IDS.join(', ')}`
		}),
		controller: z.enum(['P', 'PI', 'PD', 'PID'], { error: 'controller must be P, PI, PD or PID' }),
		parameter: positiveSeconds('parameter').nullish()
	},
	{ error: 'The request body must be a JSON object' }
);

/** Parses a tuning request body; on failure returns the first issue with the field named. */
export function parseTuningRequest(body: unknown): { ok: true; data: TuningRequest } | ({ ok: false } & SchemaIssue) {
	const parsed = tuningRequestSchema.safeParse(body);
	if (!parsed.success) return { ok: false, ...firstIssue(parsed.error) };
	return { ok: true, data: parsed.data as TuningRequest };
}
