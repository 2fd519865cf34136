/**
 * GET /api/v1/models/:id — one plant model as a document (`ModelDocument`, see
 * `$lib/server/export`): the approved revision with every fact (parameters in seconds and in its
 * display unit, num/den/delay, MV/PV, operating point, provenance, approval), the revision being
 * worked on (`openRevision`, for engineers and above), the history and the tuning sets the reader
 * may see. A viewer asking for a never-approved model gets 404 like a missing one.
 * 400 for an id that is not a positive integer; 404 `{ error: 'not_found' }` for a missing model.
 */
import { json } from '@sveltejs/kit';
import { modelDocument } from '$lib/server/export';
import { actingOf, apiError, parseId, serviceFailure } from '$lib/server/api-responses';
import type { RequestHandler } from './$types';

/** The model document for the signed-in reader. */
export const GET: RequestHandler = async (event) => {
	const acting = actingOf(event);
	if (!acting) return apiError(401, 'Sign in, or send an API token as "Authorization: Bearer <token>".');
	const id = parseId(event.params.id);
	if (id === null) return apiError(400, 'id must be a positive whole number.', 'id');
	try {
		return json(await modelDocument(acting, id, 'api'), { headers: { 'Cache-Control': 'private, no-store' } });
	} catch (e) {
		return serviceFailure(e);
	}
};
