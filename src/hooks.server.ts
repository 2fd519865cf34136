/**
 * Request pipeline: security headers → Auth.js session → who is signed in (re-read from the
 * database on every request) → route-group guards. Services check permissions again.
 *
 * Guards, by route group:
 * - `/auth/*` (Auth.js's own endpoints): 404 — sign-in and sign-out go through our form actions;
 * - `(app)` pages: signed out → 303 to `/signin?redirectTo=…`; a pending one-time password →
 *   303 to `/profile/password`; `/admin/**` → 403 for anyone but administrators;
 * - `/api/v1/**`: signed out → 401 JSON (session cookie or `Authorization: Bearer <token>`);
 *   cross-site writes with a session cookie → 403.
 */
import { randomUUID } from 'node:crypto';
import type { Handle, HandleServerError, RequestEvent, ServerInit } from '@sveltejs/kit';
import { building } from '$app/environment';
import { startMailWorker } from '$lib/server/mail/worker';
import { sequence } from '@sveltejs/kit/hooks';
import { authHandle, isHttpsOrigin, sessionUserId, signOutSession } from './auth';
import { sessionUser } from '$lib/server/auth';
import { userForToken } from '$lib/server/tokens';
import { can } from '$lib/auth/roles';

/** Headers sent on every response (CSP itself comes from kit.csp in svelte.config.js for pages). */
const SECURITY_HEADERS: Record<string, string> = {
	'X-Content-Type-Options': 'nosniff',
	'Referrer-Policy': 'strict-origin-when-cross-origin',
	'X-Frame-Options': 'DENY',
	'Permissions-Policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=()',
	'Cross-Origin-Opener-Policy': 'same-origin'
};
/** CSP for responses that kit did not render (JSON, redirects, plain text): nothing may load. */
const STRICT_CSP = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'";

function withHeaders(response: Response, event: RequestEvent): Response {
	let r = response;
	try {
		r.headers.set('X-Content-Type-Options', 'nosniff');
	} catch {
		// Immutable headers (e.g. Response.redirect): copy into a mutable response.
		r = new Response(response.body, response);
	}
	for (const [k, v] of Object.entries(SECURITY_HEADERS)) r.headers.set(k, v);
	if (!r.headers.has('Content-Security-Policy')) {
		const type = r.headers.get('Content-Type') ?? '';
		r.headers.set(
			'Content-Security-Policy',
			!type || /json|text\/plain|text\/html/.test(type) ? STRICT_CSP : "frame-ancestors 'none'"
		);
	}
	if (isHttpsOrigin(event)) r.headers.set('Strict-Transport-Security', 'max-age=31536000; includeSubDomains');
	// What a signed-in person sees is theirs: no shared cache may keep it.
	if (event.locals.user && !r.headers.has('Cache-Control')) r.headers.set('Cache-Control', 'private, no-store');
	return r;
}

const securityHeaders: Handle = async ({ event, resolve }) => withHeaders(await resolve(event), event);

const hideAuthEndpoints: Handle = async ({ event, resolve }) => {
	const p = event.url.pathname;
	if (p === '/auth' || p.startsWith('/auth/')) {
		return new Response('Not found', { status: 404, headers: { 'Content-Type': 'text/plain; charset=utf-8' } });
	}
	return resolve(event);
};

function isApi(event: RequestEvent): boolean {
	return event.url.pathname === '/api/v1' || event.url.pathname.startsWith('/api/v1/');
}

const resolveUser: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	event.locals.authMethod = null;
	const header = event.request.headers.get('authorization');
	if (isApi(event) && header && /^Bearer\s+/i.test(header)) {
		// A bearer token decides alone: a bad token is 401 even with a session cookie.
		const user = await userForToken(header.replace(/^Bearer\s+/i, '').trim());
		if (!user) return json(401, 'unauthenticated', 'The API token is not valid (unknown, revoked or expired), or its owner is deactivated.');
		event.locals.user = user;
		event.locals.authMethod = 'token';
		return resolve(event);
	}
	const id = await sessionUserId(event);
	if (id !== null) {
		const user = await sessionUser(id);
		if (user) {
			event.locals.user = user;
			event.locals.authMethod = 'session';
		} else {
			// Deactivated or removed since the cookie was issued: end the session now.
			await signOutSession(event);
		}
	}
	return resolve(event);
};

function json(status: number, error: string, message: string): Response {
	return new Response(JSON.stringify({ error, message }), {
		status,
		headers: { 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'no-store' }
	});
}

function redirectTo(event: RequestEvent, location: string): Response {
	if (event.request.headers.get('x-sveltekit-action') === 'true') {
		// A form posted with use:enhance expects an action result, not an HTTP redirect.
		return new Response(JSON.stringify({ type: 'redirect', status: 303, location }), {
			headers: { 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'no-store' }
		});
	}
	return new Response(null, { status: 303, headers: { Location: location, 'Cache-Control': 'no-store' } });
}

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

const guards: Handle = async ({ event, resolve }) => {
	const routeId = event.route.id ?? '';
	const user = event.locals.user;

	if (isApi(event)) {
		if (!user) return json(401, 'unauthenticated', 'Sign in, or send an API token as "Authorization: Bearer <token>".');
		if (user.mustChangePassword) return json(403, 'password_change_required', 'Choose a new password on your profile page first.');
		if (event.locals.authMethod === 'session' && UNSAFE.has(event.request.method)) {
			const origin = event.request.headers.get('origin');
			if (origin && origin !== event.url.origin) return json(403, 'cross_site', 'Cross-site requests are refused.');
		}
		return resolve(event);
	}

	// SvelteKit refuses cross-site form posts in production builds; refuse them here too (also in
	// development), whatever the route.
	const origin = event.request.headers.get('origin');
	if (UNSAFE.has(event.request.method) && origin && origin !== event.url.origin) {
		return new Response('Cross-site form submissions are refused.', { status: 403, headers: { 'Content-Type': 'text/plain; charset=utf-8' } });
	}

	if (routeId.startsWith('/(app)')) {
		if (!user) {
			const back = event.url.pathname + event.url.search;
			return redirectTo(event, `/signin?redirectTo=${encodeURIComponent(back)}`);
		}
		if (user.mustChangePassword && routeId !== '/(app)/profile/password') {
			return redirectTo(event, '/profile/password');
		}
		if (routeId.startsWith('/(app)/admin') && !can(user.role, 'user.manage')) {
			// Data requests and form posts are refused here; the page itself renders the 403 page
			// from the admin layout, so the person sees the usual error screen.
			const isData = event.url.pathname.endsWith('/__data.json') || event.isDataRequest;
			if (isData || event.request.method !== 'GET') {
				return event.request.headers.get('accept')?.includes('application/json') || isData
					? json(403, 'forbidden', 'Only administrators can manage users.')
					: new Response('Only administrators can manage users.', { status: 403, headers: { 'Content-Type': 'text/plain; charset=utf-8' } });
			}
		}
	}
	return resolve(event);
};

/** Start the mail outbox worker with the server (never during the build); MAIL_WORKER=0 turns it off. */
export const init: ServerInit = () => {
	if (!building) startMailWorker();
};

export const handle: Handle = sequence(securityHeaders, hideAuthEndpoints, authHandle, resolveUser, guards);

/** Unexpected errors: logged with an id; the person sees a plain message quoting that id. */
export const handleError: HandleServerError = ({ error, event, status, message }) => {
	if (status === 404) return { message: 'Not found.' };
	const errorId = randomUUID().slice(0, 8);
	console.error(`[error ${errorId}] ${event.request.method} ${event.url.pathname} (${status} ${message})`, error);
	return { message: `Something went wrong on our side. Quote reference ${errorId} when you report it.`, errorId };
};

