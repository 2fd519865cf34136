/**
 * POST /api/v1/analysis — closed-loop analysis of a plant num/den·e^(−delay·s) under a
 * P/PI/PD/PID controller (Analysis API contract of the product brief; same result as
 * `analyze(request)` from $lib/control). 200 with the analysis; 400 `{ error, field }` naming the
 * field for a body that fails the schema or a loop that cannot be analysed (e.g. ill-posed).
 * Authentication is enforced in hooks.
 */
import { analysisToJson, analyze } from '$lib/control/analyze';
import { AnalysisInputError } from '$lib/control/errors';
import { parseAnalysisRequest } from '$lib/schemas/analysis';
import { computationEndpoint } from '$lib/server/computation-endpoint';

/** Validates the body, runs the analysis; 400 `{ error, field }` for invalid input. */
export const POST = computationEndpoint(parseAnalysisRequest, (request) => analysisToJson(analyze(request)), [AnalysisInputError]);
