/**
 * GET /models/:id/export.json — the model as a JSON file (`ModelDocument` of `$lib/server/export`,
 * purpose "export": the revision shown on the model page with every fact, num/den/delay, units,
 * provenance, and the approved tuning sets), downloaded as `<TAG>_model-<id>_rev-<no>.json`.
 * Signed-in readers only (hooks); visibility as on the model page.
 */
import { exportFilename, modelDocument } from '$lib/server/export';
import { orHttpError } from '$lib/server/route-errors';
import { actingOf } from '$lib/server/api-responses';
import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';

/** The export file, as an attachment. */
export const GET: RequestHandler = async (event) => {
	const acting = actingOf(event);
	if (!acting) error(401, 'Sign in to export a model.');
	const doc = await orHttpError(modelDocument(acting, Number(event.params.id), 'export'));
	return new Response(`${JSON.stringify(doc, null, 2)}\n`, {
		headers: {
			'Content-Type': 'application/json; charset=utf-8',
			'Content-Disposition': `attachment; filename="${exportFilename(doc, 'json')}"`,
			'Cache-Control': 'private, no-store'
		}
	});
};
