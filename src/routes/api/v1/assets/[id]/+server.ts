/**
 * GET /api/v1/assets/:id — one asset: tag, name, kind, description, site and area, its models (the
 * register's rows, current and withdrawn, with the reader's visibility) and the tuning sets of
 * those models. 400 for an id that is not a positive integer; 404 `{ error: 'not_found' }` for a
 * missing asset.
 */
import { json } from '@sveltejs/kit';
import { getAssetPage } from '$lib/server/assets';
import { actingOf, apiError, parseId, serviceFailure } from '$lib/server/api-responses';
import type { RequestHandler } from './$types';

/** The asset with its models and tuning sets, for the signed-in reader. */
export const GET: RequestHandler = async (event) => {
	const acting = actingOf(event);
	if (!acting) return apiError(401, 'Sign in, or send an API token as "Authorization: Bearer <token>".');
	const id = parseId(event.params.id);
	if (id === null) return apiError(400, 'id must be a positive whole number.', 'id');
	try {
		const asset = await getAssetPage({ id: acting.user.id, role: acting.user.role }, id);
		return json(asset, { headers: { 'Cache-Control': 'private, no-store' } });
	} catch (e) {
		return serviceFailure(e);
	}
};
