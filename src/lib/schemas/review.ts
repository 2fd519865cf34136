/**
 * Query shapes of the review pages: the review-queue filters, the history comparison (`?a=&b=`),
 * the revision shown on the model page (`?revision=`) and the audit-log filters (shared by the
 * audit page and its CSV export). Values arrive as URL query strings; empty means "not given".
 * Every message names its field. Pure: usable on the server and in components.
 */
import { z } from 'zod';
import { STRUCTURE_VALUES } from './revision';

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : typeof v === 'string' ? v.trim() : v);

const optionalId = (label: string) =>
	z.preprocess(
		blankToUndefined,
		z
			.string()
			.regex(/^[1-9]\d{0,9}$/, `${label}: choose one from the list.`)
			.transform(Number)
			.optional()
	);

/** True for a real calendar date written `YYYY-MM-DD`. */
function isIsoDate(s: string): boolean {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
	const d = new Date(`${s}T00:00:00Z`);
	return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}

const optionalDate = (label: string) =>
	z.preprocess(blankToUndefined, z.string().refine(isIsoDate, `${label}: enter a date as YYYY-MM-DD.`).optional());

/** Minimum waiting times offered by the queue's age filter, in whole days. */
export const QUEUE_AGE_DAYS = [1, 3, 7, 14, 30] as const;

/** Filters of the review queue (`/review`). */
export const reviewQueueQuerySchema = z.object({
	site: optionalId('Site'),
	structure: z.preprocess(blankToUndefined, z.enum(STRUCTURE_VALUES, { error: 'Structure: choose one from the list.' }).optional()),
	author: optionalId('Author'),
	age: z.preprocess(
		blankToUndefined,
		z
			.string()
			.refine((s) => (QUEUE_AGE_DAYS as readonly number[]).includes(Number(s)), 'Waiting: choose one from the list.')
			.transform(Number)
			.optional()
	),
	kind: z.preprocess(blankToUndefined, z.enum(['model_revision', 'tuning_set'], { error: 'Kind: choose model revisions or tuning sets.' }).optional()),
	mine: z.preprocess(blankToUndefined, z.enum(['1'], { error: 'Only what I may review: tick the box or leave it empty.' }).optional())
});
/** Parsed queue filters. */
export type ReviewQueueQuery = z.infer<typeof reviewQueueQuerySchema>;

/** The two revisions compared on the history page. */
export const historyQuerySchema = z.object({
	a: optionalId('Older revision'),
	b: optionalId('Newer revision')
});

/** The revision shown on the model page (`?revision=<id>`). */
export const modelRevisionQuerySchema = z.object({ revision: optionalId('Revision') });

/** Filters of the audit log (page and CSV export). */
export const auditQuerySchema = z
	.object({
		actor: z.preprocess(blankToUndefined, z.string().max(254, 'Actor has at most 254 characters.').optional()),
		action: z.preprocess(
			blankToUndefined,
			z
				.string()
				.regex(/^[a-z][a-z0-9_.]{0,63}$|^[a-z][a-z0-9_]{0,40}\.\*$/, 'Action: choose one from the list.')
				.optional()
		),
		entityType: z.preprocess(blankToUndefined, z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, 'Entity type: choose one from the list.').optional()),
		entityId: z.preprocess(blankToUndefined, z.string().regex(/^[A-Za-z0-9_.:-]{1,40}$/, 'Entity id: letters, digits and . _ : - only, at most 40.').optional()),
		from: optionalDate('From'),
		to: optionalDate('To'),
		page: z.preprocess(blankToUndefined, z.string().regex(/^[1-9]\d{0,6}$/, 'Page: a whole number from 1.').transform(Number).optional())
	})
	.superRefine((v, ctx) => {
		if (v.from && v.to && v.to < v.from) ctx.addIssue({ code: 'custom', path: ['to'], message: 'To: choose a day on or after From.' });
	});
/** Parsed audit filters. */
export type AuditQuery = z.infer<typeof auditQuerySchema>;

/** Plain object of the query string (first value wins), for `schema.safeParse(queryValues(url.searchParams))`. */
export function queryValues(params: URLSearchParams): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of params.entries()) if (!(k in out)) out[k] = v;
	return out;
}

/** Field name → first message for that field. */
export function queryErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? String(issue.path[0]) : '_form';
		if (!(key in out)) out[key] = issue.message;
	}
	return out;
}
