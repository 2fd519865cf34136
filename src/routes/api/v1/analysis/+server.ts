/**
 * POST /api/v1/analysis — closed-loop analysis of a plant num/den·e^(−delay·s) under a
 * P/PI/PD/PID controller (Analysis API contract of the product brief; same result as
 * `analyze(request)` from $lib/control). 200 with the analysis; 400 `{ error, field }` naming the
 * field for a body that fails the schema or a loop that cannot be analysed (e.g. ill-posed).
 * Authentication is enforced in hooks.
 */
import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { analysisToJson, analyze } from '$lib/control/analyze';
import { AnalysisInputError } from '$lib/control/errors';
import { parseAnalysisRequest } from '$lib/schemas/analysis';

/** Validates the body, runs the analysis; 400 `{ error, field }` for invalid input. */
export const POST: RequestHandler = async ({ request }) => {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		return json({ error: 'The request body must be JSON.', field: null }, { status: 400 });
	}
	const parsed = parseAnalysisRequest(body);
	if (!parsed.ok) return json({ error: parsed.error, field: parsed.field }, { status: 400 });
	try {
		return json(analysisToJson(analyze(parsed.data)));
	} catch (e) {
		if (e instanceof AnalysisInputError) return json({ error: e.message, field: e.field || null }, { status: 400 });
		throw e;
	}
};
