/**
 * Input shape of a tuning set saved from the bench (create and edit): loop tag, controller type
 * and form, the settings in that form, the rule and its design parameter, the predicted metrics
 * and notes. Shared by the form action, the JSON API and the form; messages name the field.
 * Pure: usable on the server and in components.
 *
 * Settings are those of the chosen form: ideal/ISA and series use Kp, Ti, Td; for the parallel
 * form send Kp with Ti = Kp/Ki and Td = Kd/Kp (the engine's conversions do this). Ti and Td are
 * entered in `timeUnit` (s by default) and stored in seconds.
 */
import { z } from 'zod';
import { fieldErrors, formValues, optionalNumber, toNumber, toText } from './revision';

/** The same error and FormData helpers as the revision schemas. */
export { fieldErrors, formValues };

/** Controller types of a tuning set. */
export const CONTROLLER_TYPE_VALUES = ['P', 'PI', 'PD', 'PID'] as const;
/** Controller forms: ideal/ISA standard, series/interacting, parallel/independent. */
export const CONTROLLER_FORM_VALUES = ['ideal', 'series', 'parallel'] as const;

/** Human names of the fields, for messages and labels. */
export const TUNING_SET_FIELD_LABELS = {
	loopTag: 'Loop tag',
	controllerType: 'Controller type',
	form: 'Controller form',
	kp: 'Gain Kp',
	ti: 'Integral time Ti',
	td: 'Derivative time Td',
	filterN: 'Derivative filter N',
	weightB: 'Set-point weight b',
	weightC: 'Set-point weight c',
	rule: 'Tuning rule',
	ruleParameter: 'Rule parameter',
	predicted: 'Predicted metrics',
	notes: 'Notes',
	timeUnit: 'Time unit',
	version: 'Version'
} as const;
const L = TUNING_SET_FIELD_LABELS;

/** A validated tuning set; times in seconds. */
export interface TuningSetInput {
	loopTag: string;
	controllerType: (typeof CONTROLLER_TYPE_VALUES)[number];
	form: (typeof CONTROLLER_FORM_VALUES)[number];
	kp: number;
	tiSeconds: number | null;
	tdSeconds: number | null;
	filterN: number | null;
	weightB: number | null;
	weightC: number | null;
	rule: string | null;
	/** τc or λ in seconds, where the rule has one. */
	ruleParameter: number | null;
	/** Metric name → value (finite) or null; at most 40 entries. */
	predicted: Record<string, number | null> | null;
	notes: string | null;
}

/** JSON text or an object of metric → number|null. */
function toPredicted(v: unknown): unknown {
	if (v === undefined || v === null || v === '') return undefined;
	if (typeof v === 'string') {
		try {
			return JSON.parse(v);
		} catch {
			return v;
		}
	}
	return v;
}

const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

/** The tuning-set form and API body. */
export function tuningSetSchema() {
	return z
		.object(
			{
				loopTag: z.preprocess(
					(x) => (typeof toText(x) === 'string' ? (toText(x) as string).toUpperCase() : toText(x)),
					z
						.string({ error: `${L.loopTag}: enter a tag such as TIC-2104.` })
						.regex(/^[A-Z0-9][A-Z0-9._/-]{0,39}$/, `${L.loopTag}: 1–40 letters, digits, and . _ / - (starting with a letter or digit).`)
				),
				controllerType: z.preprocess(toText, z.enum(CONTROLLER_TYPE_VALUES, { error: `${L.controllerType}: choose P, PI, PD or PID.` })),
				form: z.preprocess(toText, z.enum(CONTROLLER_FORM_VALUES, { error: `${L.form}: choose ideal, series or parallel.` }).default('ideal')),
				timeUnit: z.preprocess(toText, z.enum(['s', 'min'], { error: `${L.timeUnit}: choose s or min.` }).default('s')),
				kp: z.preprocess(
					toNumber,
					z
						.number({ error: (i) => (i.input === undefined ? `${L.kp}: enter a value.` : `${L.kp}: enter a number.`) })
						.refine((x) => Number.isFinite(x), `${L.kp} must be a finite number.`)
						.refine((x) => x !== 0, `${L.kp} must not be zero.`)
				),
				ti: optionalNumber(L.ti),
				td: optionalNumber(L.td),
				filterN: optionalNumber(L.filterN),
				weightB: optionalNumber(L.weightB),
				weightC: optionalNumber(L.weightC),
				rule: z.preprocess(
					toText,
					z
						.string({ error: `${L.rule} must be text.` })
						.regex(/^[a-z0-9][a-z0-9-]{0,39}$/, `${L.rule}: a rule id such as simc or zn-step.`)
						.optional()
				),
				ruleParameter: optionalNumber(L.ruleParameter),
				predicted: z.preprocess(
					toPredicted,
					z
						.record(z.string().regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, `${L.predicted}: metric names are letters and digits.`), z.number({ error: `${L.predicted}: values must be numbers or null.` }).nullable(), {
							error: `${L.predicted}: an object of metric names and numbers.`
						})
						.refine((r) => Object.keys(r).length <= 40, `${L.predicted}: at most 40 metrics.`)
						.refine((r) => Object.values(r).every((x) => x === null || Number.isFinite(x)), `${L.predicted}: values must be finite numbers or null.`)
						.optional()
				),
				notes: z.preprocess(toText, z.string({ error: `${L.notes} must be text.` }).max(4000, `${L.notes} has at most 4000 characters.`).optional())
			},
			{ error: 'The tuning set must be an object of fields.' }
		)
		.superRefine(
			(v, ctx) => {
				const add = (field: string, message: string) => ctx.addIssue({ code: 'custom', path: [field], message });
				const type = v.controllerType as string;
				const hasI = type === 'PI' || type === 'PID';
				const hasD = type === 'PD' || type === 'PID';
				if (hasI) {
					if (v.ti === undefined) add('ti', `${L.ti}: enter a value for a ${type} controller.`);
					else if (isNum(v.ti) && !(v.ti > 0)) add('ti', `${L.ti} must be greater than zero.`);
				}
				if (hasD) {
					if (v.td === undefined) add('td', `${L.td}: enter a value for a ${type} controller.`);
					else if (isNum(v.td) && v.td < 0) add('td', `${L.td} must be zero or positive.`);
					if (isNum(v.filterN) && !(v.filterN > 0)) add('filterN', `${L.filterN} must be greater than zero.`);
				}
				for (const w of ['weightB', 'weightC'] as const) {
					const x = v[w];
					if (isNum(x) && (x < 0 || x > 1)) add(w, `${L[w]} must be between 0 and 1.`);
				}
				if (isNum(v.ruleParameter) && !(v.ruleParameter > 0)) add('ruleParameter', `${L.ruleParameter} must be greater than zero.`);
			},
			{ when: () => true }
		)
		.transform((v): TuningSetInput => {
			const f = v.timeUnit === 'min' ? 60 : 1;
			const type = v.controllerType;
			const hasI = type === 'PI' || type === 'PID';
			const hasD = type === 'PD' || type === 'PID';
			return {
				loopTag: v.loopTag as string,
				controllerType: type,
				form: v.form,
				kp: v.kp as number,
				tiSeconds: hasI ? (v.ti as number) * f : null,
				tdSeconds: hasD ? (v.td as number) * f : null,
				filterN: hasD ? (v.filterN ?? null) : null,
				weightB: v.weightB ?? null,
				weightC: v.weightC ?? null,
				rule: v.rule ?? null,
				ruleParameter: v.ruleParameter ?? null,
				predicted: (v.predicted as Record<string, number | null> | undefined) ?? null,
				notes: v.notes ?? null
			};
		});
}

/** The tuning-set edit form: the fields plus `version`. */
export function tuningSetEditSchema() {
	const base = tuningSetSchema();
	return z
		.looseObject({ version: z.preprocess(toNumber, z.number({ error: `${L.version} is missing; reload the page.` }).int().min(0)) })
		.transform((v, ctx) => {
			const parsed = base.safeParse(v);
			if (!parsed.success) {
				for (const issue of parsed.error.issues) ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message });
				return z.NEVER;
			}
			return { version: v.version as number, tuningSet: parsed.data };
		});
}
