/**
 * GET /models/:id/export.csv — the model as a CSV file, one row per fact with the columns
 * `section,item,value,unit,note` (layout in `modelCsv` of `$lib/server/export`), downloaded as
 * `<TAG>_model-<id>_rev-<no>.csv`. Signed-in readers only (hooks); visibility as on the model page.
 */
import { exportFilename, modelCsv, modelDocument } from '$lib/server/export';
import { orHttpError } from '$lib/server/route-errors';
import { actingOf } from '$lib/server/api-responses';
import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';

/** The export file, as an attachment (UTF-8 with a byte-order mark so spreadsheet programs read the units right). */
export const GET: RequestHandler = async (event) => {
	const acting = actingOf(event);
	if (!acting) error(401, 'Sign in to export a model.');
	const doc = await orHttpError(modelDocument(acting, Number(event.params.id), 'export'));
	return new Response(`\uFEFF${modelCsv(doc)}\r\n`, {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="${exportFilename(doc, 'csv')}"`,
			'Cache-Control': 'private, no-store'
		}
	});
};
