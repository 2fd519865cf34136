/**
 * Maps the typed errors of the services to SvelteKit's `error()` inside `load` functions:
 * NotFound → 404, PermissionDenied → 403, other ServiceErrors → their status, each with the
 * service's message. Anything unexpected is rethrown for `handleError`. Relative imports only.
 */
import { error } from '@sveltejs/kit';
import { httpStatusOf, isExpectedError } from './errors';

/** Awaits a service call; expected failures become HTTP errors with the service's message. */
export async function orHttpError<T>(work: Promise<T>): Promise<T> {
	try {
		return await work;
	} catch (e) {
		if (isExpectedError(e)) error(httpStatusOf(e), e.message);
		throw e;
	}
}

/** The signed-in person for a read service, or a 401 when the guard was somehow bypassed. */
export function actorOf(user: App.Locals['user']): { id: number; role: NonNullable<App.Locals['user']>['role'] } {
	if (!user) error(401, 'Sign in to see this page.');
	return { id: user.id, role: user.role };
}
