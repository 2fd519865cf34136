/**
 * POST /api/v1/tuning — one published tuning rule applied to an FOPDT/SOPDT/IPDT model (Tuning
 * contract of the product brief). 200 with `{ rule, controller, ideal, published, warnings }`;
 * 400 `{ error, field }` for a body that fails the schema or a rule that does not apply (the
 * message says why). Authentication is enforced in hooks.
 */
import { tune, TuningError } from '$lib/control/tuning';
import { parseTuningRequest } from '$lib/schemas/tuning';
import { computationEndpoint } from '$lib/server/computation-endpoint';

/** Applies the requested tuning rule; 400 `{ error, field }` when the body is invalid or the rule does not apply. */
export const POST = computationEndpoint(parseTuningRequest, tune, [TuningError]);
