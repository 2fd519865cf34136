import { historyQuerySchema, queryErrors, queryValues } from '$lib/schemas/review';
import { diffRevisions, getHistory, type HistoryItem } from '$lib/server/revisions';
import { actingFrom } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import { stepOverlay } from '$lib/components/review/step-overlay';
import { todayUtc } from '$lib/format';
import type { PageServerLoad } from './$types';

/**
 * The history of one model: every revision the reader may see, newest first, and the comparison
 * of two of them (`?a=<revision id>&b=<revision id>`, shown older → newer): parameters with the
 * change in %, other fields, word diffs of the texts, and both open-loop step responses. Without
 * a choice it compares the newest revision with the one it started from (or the one before it).
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const modelId = Number(event.params.id);
	const history = await orHttpError(getHistory(acting, modelId));
	const revisions = history.revisions;
	const parsed = historyQuerySchema.safeParse(queryValues(event.url.searchParams));
	const errors: Record<string, string> = parsed.success ? {} : queryErrors(parsed.error);
	const byId = new Map(revisions.map((r) => [r.id, r]));

	let a: HistoryItem | undefined;
	let b: HistoryItem | undefined;
	if (parsed.success && (parsed.data.a || parsed.data.b)) {
		a = parsed.data.a ? byId.get(parsed.data.a) : undefined;
		b = parsed.data.b ? byId.get(parsed.data.b) : undefined;
		if (parsed.data.a && !a) errors.a = 'Older revision: choose a revision of this model from the list.';
		if (parsed.data.b && !b) errors.b = 'Newer revision: choose a revision of this model from the list.';
		if (!parsed.data.a) errors.a = 'Older revision: choose one to compare with.';
		if (!parsed.data.b) errors.b = 'Newer revision: choose one to compare with.';
	} else if (revisions.length >= 2) {
		b = revisions[0];
		a = (b.baseRevisionId !== null ? byId.get(b.baseRevisionId) : undefined) ?? revisions[1];
	}
	if (a && b && a.id === b.id) errors.b = 'Newer revision: choose a different revision from the older one.';
	let comparison = null;
	if (a && b && Object.keys(errors).length === 0) {
		const [older, newer] = a.no <= b.no ? [a, b] : [b, a];
		const c = await orHttpError(diffRevisions(acting, older.id, newer.id));
		const field = (key: string) => c.fields.find((f) => f.key === key)?.to;
		comparison = {
			from: { ...c.from, authorName: older.author.name },
			to: { ...c.to, authorName: newer.author.name },
			parameters: c.parameters,
			fields: c.fields,
			texts: c.texts,
			largeChanges: c.largeChanges.map((l) => l.message),
			units: {
				timeUnit: field('timeUnit') === 'min' ? ('min' as const) : ('s' as const),
				pv: String(field('pvUnit') ?? ''),
				mv: String(field('mvUnit') ?? '')
			},
			overlay: stepOverlay(c.plants.from, c.plants.to)
		};
	}
	return {
		model: history.model,
		revisions,
		selected: { a: a?.id ?? null, b: b?.id ?? null },
		errors,
		comparison,
		today: todayUtc()
	};
}) satisfies PageServerLoad;
