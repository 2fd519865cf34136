/**
 * What the review pages' form actions share: who is acting (from `locals`, with the client
 * address), and the mapping of a refused or failed workflow write to `fail(status, …)` with a
 * message a person can act on — under its field when the service names one (422), a "nothing was
 * changed" line for state conflicts (409: someone else approved or sent it back first), the
 * four-eyes or role reason for 403. Unexpected errors are rethrown for `handleError`. Relative
 * imports only.
 */
import { error, fail } from '@sveltejs/kit';
import { ModelRevision, initModels } from './db/models';
import { httpStatusOf, isExpectedError, ServiceError } from './errors';
import { ConflictError } from './workflow-common';
import type { Acting } from './workflow-common';

/** The signed-in person as the workflow services want them; 401 when the guard was bypassed. */
export function actingFrom(event: { locals: App.Locals; getClientAddress: () => string }): Acting {
	const u = event.locals.user;
	if (!u) error(401, 'Sign in first.');
	let ip: string | null = null;
	try {
		ip = event.getClientAddress();
	} catch {
		ip = null;
	}
	return { user: { id: u.id, email: u.email, name: u.name, role: u.role }, ip };
}

/** What a review action returns on failure (under `form`). */
export interface ReviewActionFailure {
	action: string;
	ok: false;
	errors: Record<string, string>;
	values: Record<string, string>;
	/** 409: the state changed under the reader; the page reloads what is stored now. */
	conflict: boolean;
}

/**
 * `fail(status, …)` for an expected error of a workflow write: field messages for 422, the
 * service's message otherwise — prefixed "Nothing was changed." for state conflicts (409).
 */
export function reviewActionFailure(e: unknown, action: string, values: Record<string, string>) {
	if (!isExpectedError(e)) throw e;
	const status = httpStatusOf(e);
	const errors: Record<string, string> = { ...(e instanceof ServiceError ? e.fieldErrors : {}) };
	if (Object.keys(errors).length === 0) {
		errors._form =
			status === 409 && !(e instanceof ConflictError)
				? `Nothing was changed. ${e.message} It may have changed since you opened this page, which now shows what is stored.`
				: e.message;
	}
	return fail(status, { action, ok: false as const, errors, values, conflict: status === 409 } satisfies ReviewActionFailure);
}

/**
 * Throws a 404 unless revision `revisionId` belongs to model `modelId` (so an address never acts
 * on another model's revision). Says nothing else about the revision.
 */
export async function assertRevisionOfModel(revisionId: number, modelId: number): Promise<void> {
	initModels();
	const r = await ModelRevision.findByPk(revisionId, { attributes: ['id', 'model_id'] });
	if (!r || Number(r.model_id) !== modelId) error(404, 'This model has no such revision.');
}
