/**
 * The shared shape of the computation endpoints (POST /api/v1/analysis, /tuning, /design): read
 * the JSON body, validate it with the request's zod schema, compute, and answer 400
 * `{ error, field }` for a body that is not JSON, fails the schema, or that the computation
 * refuses with its typed error (which names the field). Anything else is rethrown to `handleError`.
 */
import { json, type RequestHandler } from '@sveltejs/kit';

/** A schema parse result: the typed request, or the first issue with its field path. */
type Parsed<T> = { ok: true; data: T } | { ok: false; error: string; field: string | null };

/** An error a computation throws for input it cannot use, naming the request field. */
type FieldError = abstract new (...args: never[]) => Error & { field: string | null };

/** A POST handler: parse → compute → JSON, with the 400 answers described above. */
export function computationEndpoint<T>(parse: (body: unknown) => Parsed<T>, compute: (request: T) => unknown, refusals: readonly FieldError[]): RequestHandler {
	return async ({ request }) => {
		let body: unknown;
		try {
			body = await request.json();
		} catch {
			return json({ error: 'The request body must be JSON.', field: null }, { status: 400 });
		}
		const parsed = parse(body);
		if (!parsed.ok) return json({ error: parsed.error, field: parsed.field }, { status: 400 });
		try {
			return json(compute(parsed.data));
		} catch (e) {
			if (refusals.some((E) => e instanceof E)) {
				const err = e as Error & { field: string | null };
				return json({ error: err.message, field: err.field || null }, { status: 400 });
			}
			throw e;
		}
	};
}
