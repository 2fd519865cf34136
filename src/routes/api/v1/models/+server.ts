/**
 * GET /api/v1/models — the register as JSON: the same filters, sort and paging as the register page
 * (`q` text over tag, asset name and model title; `site`, `area`, `kind`, `structure`, `state`,
 * `stale=1`; `sort`, `dir`; `page`, 25 rows a page). Visibility follows the reader's role (viewers:
 * approved models only). 200 `{ models, total, page, pageCount, pageSize, today, query }`;
 * 400 `{ error, message, field, issues }` naming the first bad parameter. Authentication (session
 * or `Authorization: Bearer <token>`) is enforced in hooks.
 */
import { json } from '@sveltejs/kit';
import { parseRegisterQuery } from '$lib/schemas/register';
import { listRegister } from '$lib/server/register';
import { actingOf, apiError, serviceFailure } from '$lib/server/api-responses';
import type { RequestHandler } from './$types';

/** One page of the register for the signed-in reader; 400 naming the field for a bad parameter. */
export const GET: RequestHandler = async (event) => {
	const acting = actingOf(event);
	if (!acting) return apiError(401, 'Sign in, or send an API token as "Authorization: Bearer <token>".');
	const { query, issues } = parseRegisterQuery(event.url.searchParams);
	if (issues.length > 0) return apiError(400, issues[0].message, issues[0].field, { issues });
	try {
		const page = await listRegister({ id: acting.user.id, role: acting.user.role }, query);
		return json(
			{ models: page.rows, total: page.total, page: page.page, pageCount: page.pageCount, pageSize: page.pageSize, today: page.today, query },
			{ headers: { 'Cache-Control': 'private, no-store' } }
		);
	} catch (e) {
		return serviceFailure(e);
	}
};
