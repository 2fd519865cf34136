/**
 * Request schema of design from specification (POST /api/v1/design and the bench's design form).
 * Pure: usable on the server and in components. Times in seconds, frequencies in rad/s.
 */
import { z } from 'zod';
import type { DesignRequest } from '../control/design';
import { finiteNumber, firstIssue, nonNegativeSeconds, plantGain, positiveSeconds, type SchemaIssue } from './tuning';

const theta = nonNegativeSeconds('plant.theta').nullish();

const fopdt = z.object({
	structure: z.literal('fopdt'),
	k: plantGain('plant.k'),
	tau: positiveSeconds('plant.tau'),
	theta
});

const sopdt = z.object({
	structure: z.literal('sopdt'),
	k: plantGain('plant.k'),
	tau: positiveSeconds('plant.tau'),
	tau2: positiveSeconds('plant.tau2'),
	theta
});

const secondOrder = z.object({
	structure: z.literal('second_order'),
	k: plantGain('plant.k'),
	wn: finiteNumber('plant.wn').positive('plant.wn must be greater than zero (rad/s)'),
	zeta: finiteNumber('plant.zeta').min(0, 'plant.zeta must be zero or positive'),
	theta
});

/** Plant of a design request: fopdt (k, tau), sopdt (k, tau, tau2) or second_order (k, wn, zeta); optional theta. */
export const designPlantSchema = z.discriminatedUnion('structure', [fopdt, sopdt, secondOrder], {
	error: (issue) =>
		issue.input === undefined || issue.input === null || typeof issue.input !== 'object'
			? 'plant must be an object with structure and k'
			: 'plant.structure must be fopdt, sopdt or second_order'
});

/** Target: ζ or overshoot % (not both), settling time in s or ωn in rad/s (not both). */
export const designTargetSchema = z
	.object(
		{
			zeta: finiteNumber('target.zeta').positive('target.zeta must be greater than zero').nullish(),
			overshootPercent: finiteNumber('target.overshootPercent')
				.min(0, 'target.overshootPercent must be 0 or more')
				.lt(100, 'target.overshootPercent must be below 100')
				.nullish(),
			settlingTime: positiveSeconds('target.settlingTime').nullish(),
			wn: finiteNumber('target.wn').positive('target.wn must be greater than zero (rad/s)').nullish()
		},
		{ error: 'target must be an object' }
	)
	.superRefine((t, ctx) => {
		if (t.zeta != null && t.overshootPercent != null)
			ctx.addIssue({ code: 'custom', path: ['overshootPercent'], message: 'give either target.zeta or target.overshootPercent, not both' });
		if (t.settlingTime != null && t.wn != null)
			ctx.addIssue({ code: 'custom', path: ['wn'], message: 'give either target.settlingTime or target.wn, not both' });
	});

/** Design request: plant, controller (P, PI, PD, PID), target, optional extra-pole factor (> 1). */
export const designRequestSchema = z.object(
	{
		plant: designPlantSchema,
		controller: z.enum(['P', 'PI', 'PD', 'PID'], { error: 'controller must be P, PI, PD or PID' }),
		target: designTargetSchema,
		extraPoleFactor: finiteNumber('extraPoleFactor').gt(1, 'extraPoleFactor must be greater than 1').nullish()
	},
	{ error: 'The request body must be a JSON object' }
);

/** Parses a design request body; on failure returns the first issue with the field named. */
export function parseDesignRequest(body: unknown): { ok: true; data: DesignRequest } | ({ ok: false } & SchemaIssue) {
	const parsed = designRequestSchema.safeParse(body);
	if (!parsed.success) return { ok: false, ...firstIssue(parsed.error) };
	return { ok: true, data: parsed.data as DesignRequest };
}
