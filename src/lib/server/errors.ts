/**
 * Typed errors that services throw for expected failures; routes map them to HTTP statuses
 * (403, 404, 409, 422) with `httpStatusOf`. Unexpected errors are anything else and end in
 * `handleError` (logged with an id).
 */
import { fail } from '@sveltejs/kit';
import { PermissionDenied } from '../auth/roles';

export { PermissionDenied };

/** Base class: an expected failure with an HTTP status and a message safe to show the user. */
export class ServiceError extends Error {
	constructor(
		readonly status: 400 | 401 | 403 | 404 | 409 | 422 | 429,
		message: string,
		/** Field name → message, when the failure belongs to a form field. */
		readonly fieldErrors: Record<string, string> = {}
	) {
		super(message);
		this.name = 'ServiceError';
	}
}

/** The thing asked for does not exist (or is not visible to this person). */
export class NotFound extends ServiceError {
	constructor(message = 'Not found.') {
		super(404, message);
		this.name = 'NotFound';
	}
}

/** The request conflicts with the current state (e.g. it would remove the last administrator). */
export class Conflict extends ServiceError {
	constructor(message: string, fieldErrors: Record<string, string> = {}) {
		super(409, message, fieldErrors);
		this.name = 'Conflict';
	}
}

/** Input that passed the schema but breaks a rule of the domain, with the field named. */
export class InvalidInput extends ServiceError {
	constructor(field: string, message: string) {
		super(422, message, { [field]: message });
		this.name = 'InvalidInput';
	}
}

/** True for errors a route should answer with their own status and message. */
export function isExpectedError(e: unknown): e is ServiceError | PermissionDenied {
	return e instanceof ServiceError || e instanceof PermissionDenied;
}

/** The HTTP status of an expected error (403 for PermissionDenied). */
export function httpStatusOf(e: ServiceError | PermissionDenied): number {
	return e instanceof PermissionDenied ? 403 : e.status;
}

/**
 * For form actions: turn an expected error into `fail(status, { errors, values })` with the
 * message under its field (or `_form`); rethrow anything unexpected so `handleError` logs it.
 */
export function actionFailure<V extends Record<string, unknown>>(e: unknown, values: V, action?: string) {
	if (!isExpectedError(e)) throw e;
	const errors: Record<string, string> = { ...(e instanceof ServiceError ? e.fieldErrors : {}) };
	if (Object.keys(errors).length === 0) errors._form = e.message;
	return fail(httpStatusOf(e), { errors, values, action: action ?? null });
}
