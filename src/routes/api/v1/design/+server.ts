/**
 * POST /api/v1/design — controller gains by pole placement from a damping/overshoot and
 * settling-time/ωn target. 200 with `{ controller, ideal, target, closedLoopPoles,
 * characteristic, warnings }`; 400 `{ error, field }` for a body that fails the schema or a
 * target that cannot be reached (the message says why). Authentication is enforced in hooks.
 */
import { designController, DesignError } from '$lib/control/design';
import { parseDesignRequest } from '$lib/schemas/design';
import { computationEndpoint } from '$lib/server/computation-endpoint';

/** Designs the controller by pole placement; 400 `{ error, field }` when the body is invalid or the target unreachable. */
export const POST = computationEndpoint(parseDesignRequest, designController, [DesignError]);
