/**
 * Auth.js for Loopledger: email + password (Credentials provider) with a JWT session cookie.
 * The JWT carries only the user id; `hooks.server.ts` re-reads the person from the database on
 * every request, so deactivation and role changes apply at once. Auth.js's own HTTP endpoints
 * under `/auth/*` are not exposed (hooks answer 404): sign-in and sign-out go through our form
 * actions, which call Auth.js on the server with `signInWithPassword` / `signOutSession`.
 */
import { randomBytes } from 'node:crypto';
import { SvelteKitAuth, CredentialsSignin, type SvelteKitAuthConfig } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import { Auth, createActionURL, raw, setEnvDefaults, skipCSRFCheck } from '@auth/core';
import type { RequestEvent } from '@sveltejs/kit';
import { env as dynamicEnv } from '$env/dynamic/private';
import { env } from '$lib/server/env';
import { authenticate } from '$lib/server/auth';

/** A session lasts one long shift (12 h) and is extended while used (refreshed at most hourly). */
export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60;

/** Why Auth.js refused a sign-in, carried in the CredentialsSignin `code`. */
class SignInRefused extends CredentialsSignin {
	constructor(code: string) {
		super();
		this.code = code;
	}
}

/** A per-process secret for demo and development runs without AUTH_SECRET (sessions end at restart). */
const fallbackSecret = randomBytes(32).toString('base64url');

/** True when the public origin is https (then cookies are `Secure` and HSTS is sent). */
export function isHttpsOrigin(event: Pick<RequestEvent, 'url'>): boolean {
	const origin = env().ORIGIN;
	return origin ? origin.startsWith('https:') : event.url.protocol === 'https:';
}

/** The Auth.js configuration for this request (secret, cookie security and provider). */
export function authConfig(event: Pick<RequestEvent, 'url'>): SvelteKitAuthConfig {
	const e = env();
	const secure = isHttpsOrigin(event);
	return {
		secret: e.AUTH_SECRET || fallbackSecret,
		trustHost: true,
		useSecureCookies: secure,
		session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_SECONDS, updateAge: 60 * 60 },
		jwt: { maxAge: SESSION_MAX_AGE_SECONDS },
		pages: { signIn: '/signin', signOut: '/signout', error: '/signin' },
		providers: [
			Credentials({
				id: 'credentials',
				name: 'Email and password',
				credentials: { email: {}, password: {}, clientAddress: {} },
				async authorize(credentials) {
					const email = typeof credentials?.email === 'string' ? credentials.email : '';
					const password = typeof credentials?.password === 'string' ? credentials.password : '';
					const address = typeof credentials?.clientAddress === 'string' && credentials.clientAddress ? credentials.clientAddress : null;
					if (!email || !password) throw new SignInRefused('invalid');
					const outcome = await authenticate(email, password, address);
					if (outcome.ok) return { id: String(outcome.user.id), email: outcome.user.email, name: outcome.user.name };
					if (outcome.reason === 'locked') throw new SignInRefused(`locked:${outcome.retryAt.toISOString()}`);
					throw new SignInRefused(outcome.reason);
				}
			})
		],
		callbacks: {
			jwt({ token, user }) {
				if (user?.id) token.uid = Number(user.id);
				return token;
			},
			session({ session, token }) {
				const uid = typeof token.uid === 'number' ? token.uid : 0;
				return { ...session, user: { ...session.user, id: String(uid) } };
			}
		},
		logger: {
			// A refused sign-in is expected and audited; do not print it as an error.
			error(error) {
				if (error instanceof CredentialsSignin) return;
				console.error('[auth]', error);
			},
			warn() {},
			debug() {}
		}
	};
}

/** The Auth.js handle: sets `locals.auth()` (reads the session cookie). */
export const { handle: authHandle } = SvelteKitAuth(async (event) => authConfig(event));

/** Everything Auth.js needs to process one internal request, with our defaults applied. */
function prepared(event: RequestEvent): SvelteKitAuthConfig {
	const config = authConfig(event);
	config.basePath = '/auth';
	config.skipCSRFCheck = skipCSRFCheck;
	setEnvDefaults(dynamicEnv, config);
	return config;
}

function copyCookies(event: RequestEvent, cookies: { name: string; value: string; options?: Record<string, unknown> }[] | undefined): void {
	for (const c of cookies ?? []) {
		event.cookies.set(c.name, c.value, { path: '/', ...(c.options as object) });
	}
}

/** Result of a sign-in through our form. */
export type PasswordSignIn =
	| { ok: true }
	| { ok: false; reason: 'invalid' | 'inactive' }
	| { ok: false; reason: 'locked'; retryAt: Date };

/**
 * Sign in with email and password on the server (Auth.js Credentials callback, raw mode), setting
 * the session cookie on success. The caller decides where to redirect.
 */
export async function signInWithPassword(event: RequestEvent, email: string, password: string): Promise<PasswordSignIn> {
	const config = prepared(event);
	const headers = new Headers(event.request.headers);
	headers.set('Content-Type', 'application/x-www-form-urlencoded');
	const url = `${createActionURL('callback', event.url.protocol, headers, dynamicEnv, config)}/credentials`;
	const body = new URLSearchParams({ email, password, clientAddress: clientAddressOf(event) ?? '', callbackUrl: '/' });
	try {
		const res = await Auth(new Request(url, { method: 'POST', headers, body }), { ...config, raw });
		copyCookies(event, res.cookies as never);
		return { ok: true };
	} catch (e) {
		if (e instanceof CredentialsSignin) {
			const code = e.code ?? '';
			if (code.startsWith('locked:')) {
				const at = new Date(code.slice('locked:'.length));
				return { ok: false, reason: 'locked', retryAt: Number.isNaN(at.getTime()) ? new Date() : at };
			}
			return { ok: false, reason: code === 'inactive' ? 'inactive' : 'invalid' };
		}
		throw e;
	}
}

/** End the session: Auth.js clears its cookies. */
export async function signOutSession(event: RequestEvent): Promise<void> {
	const config = prepared(event);
	const headers = new Headers(event.request.headers);
	headers.set('Content-Type', 'application/x-www-form-urlencoded');
	const url = createActionURL('signout', event.url.protocol, headers, dynamicEnv, config);
	const res = await Auth(new Request(url, { method: 'POST', headers, body: new URLSearchParams({ callbackUrl: '/signin' }) }), {
		...config,
		raw
	});
	copyCookies(event, res.cookies as never);
}

/** The user id in the session cookie, or null when there is no valid session. */
export async function sessionUserId(event: RequestEvent): Promise<number | null> {
	const session = await event.locals.auth();
	const id = Number(session?.user?.id);
	return Number.isSafeInteger(id) && id > 0 ? id : null;
}

/** The client address as the adapter reports it (ADDRESS_HEADER only when configured), or null. */
export function clientAddressOf(event: Pick<RequestEvent, 'getClientAddress'>): string | null {
	try {
		return event.getClientAddress();
	} catch {
		return null;
	}
}
