/**
 * POST /api/v1/tuning — one published tuning rule applied to an FOPDT/SOPDT/IPDT model (Tuning
 * contract of the product brief). 200 with `{ rule, controller, ideal, published, warnings }`;
 * 400 `{ error, field }` for a body that fails the schema or a rule that does not apply (the
 * message says why). Authentication is enforced in hooks.
 */
import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { tune, TuningError } from '$lib/control/tuning';
import { parseTuningRequest } from '$lib/schemas/tuning';

/** Applies the requested tuning rule; 400 `{ error, field }` when the body is invalid or the rule does not apply. */
export const POST: RequestHandler = async ({ request }) => {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		return json({ error: 'The request body must be JSON.', field: null }, { status: 400 });
	}
	const parsed = parseTuningRequest(body);
	if (!parsed.ok) return json({ error: parsed.error, field: parsed.field }, { status: 400 });
	try {
		return json(tune(parsed.data));
	} catch (e) {
		if (e instanceof TuningError) return json({ error: e.message, field: e.field }, { status: 400 });
		throw e;
	}
};
