/**
 * POST /api/v1/design — controller gains by pole placement from a damping/overshoot and
 * settling-time/ωn target. 200 with `{ controller, ideal, target, closedLoopPoles,
 * characteristic, warnings }`; 400 `{ error, field }` for a body that fails the schema or a
 * target that cannot be reached (the message says why). Authentication is enforced in hooks.
 */
import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { designController, DesignError } from '$lib/control/design';
import { parseDesignRequest } from '$lib/schemas/design';

/** Designs the controller by pole placement; 400 `{ error, field }` when the body is invalid or the target unreachable. */
export const POST: RequestHandler = async ({ request }) => {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		return json({ error: 'The request body must be JSON.', field: null }, { status: 400 });
	}
	const parsed = parseDesignRequest(body);
	if (!parsed.ok) return json({ error: parsed.error, field: parsed.field }, { status: 400 });
	try {
		return json(designController(parsed.data));
	} catch (e) {
		if (e instanceof DesignError) return json({ error: e.message, field: e.field }, { status: 400 });
		throw e;
	}
};
