/**
 * JSON answers shared by the model and asset API routes: `{ error, message, field? }` bodies with
 * the HTTP status of the service's typed error (403, 404, 409, 422), 400 for a bad id or query
 * parameter (the field named), and the `Acting` of the signed-in person (session or API token).
 */
import { json, type RequestEvent } from '@sveltejs/kit';
import { httpStatusOf, isExpectedError } from './errors';
import type { Acting } from './revisions';

const CODES: Record<number, string> = { 400: 'bad_request', 401: 'unauthenticated', 403: 'forbidden', 404: 'not_found', 409: 'conflict', 422: 'invalid' };

/** A JSON error body `{ error, message, field }` with `status`; `extra` adds fields (e.g. `issues`). */
export function apiError(status: number, message: string, field: string | null = null, extra: Record<string, unknown> = {}): Response {
	return json({ error: CODES[status] ?? 'error', message, field, ...extra }, { status, headers: { 'Cache-Control': 'private, no-store' } });
}

/** The service's expected error as JSON; anything unexpected is rethrown for `handleError`. */
export function serviceFailure(e: unknown): Response {
	if (!isExpectedError(e)) throw e;
	const fields = 'fieldErrors' in e ? Object.keys(e.fieldErrors) : [];
	return apiError(httpStatusOf(e), e.message, fields[0] ?? null);
}

/** Largest id a row may have (INT UNSIGNED). */
const MAX_ID = 4_294_967_295;

/** The positive integer id of a path segment, or null when it is not one. */
export function parseId(raw: string): number | null {
	if (!/^[1-9]\d{0,9}$/.test(raw)) return null;
	const id = Number(raw);
	return id <= MAX_ID ? id : null;
}

/** Who is acting for the services: the signed-in person (hooks guarantee one on /api/v1) and the client address. */
export function actingOf(event: Pick<RequestEvent, 'locals' | 'getClientAddress'>): Acting | null {
	const u = event.locals.user;
	if (!u) return null;
	let ip: string | null = null;
	try {
		ip = event.getClientAddress();
	} catch {
		ip = null;
	}
	return { user: { id: u.id, email: u.email, name: u.name, role: u.role }, ip };
}
