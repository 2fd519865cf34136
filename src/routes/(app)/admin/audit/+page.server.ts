import { auditQuerySchema, queryErrors, queryValues } from '$lib/schemas/review';
import { AUDIT_EXPORT_MAX_ROWS, auditFacets, searchAudit } from '$lib/server/audit-log';
import { actingFrom } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/**
 * The audit log for administrators: filters (actor, action, entity, date range) from the query
 * string, 50 events a page, newest first; the CSV export link carries the same filters. Invalid
 * filters are named next to their field and no rows are shown.
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const values = queryValues(event.url.searchParams);
	const parsed = auditQuerySchema.safeParse(values);
	const facets = await orHttpError(auditFacets(acting));
	if (!parsed.success) {
		return { facets, query: values, errors: queryErrors(parsed.error), page: null, exportQuery: null, exportMax: AUDIT_EXPORT_MAX_ROWS };
	}
	const { page, ...filter } = parsed.data;
	const result = await orHttpError(searchAudit(acting, filter, page ?? 1));
	const exportParams = new URLSearchParams();
	for (const [k, v] of Object.entries(filter)) if (v) exportParams.set(k, String(v));
	return { facets, query: values, errors: {} as Record<string, string>, page: result, exportQuery: exportParams.toString(), exportMax: AUDIT_EXPORT_MAX_ROWS };
}) satisfies PageServerLoad;
