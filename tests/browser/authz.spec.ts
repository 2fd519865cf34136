/**
 * Authorisation over every route and API endpoint that exists, for the four roles of PRODUCT.md
 * and for someone signed out, against the running server (BASE_URL; `npm test` starts it with
 * the demo data). Plain HTTP (fetch), no browser: each role signs in by POSTing the sign-in form
 * with an Origin header (SvelteKit's CSRF check) and keeps the session cookie.
 *
 * Routes are discovered from src/routes (+page.svelte, +page.server.ts, +server.ts); a route
 * missing from TABLE fails the test, so whoever adds a route must state who may use it.
 * Expected statuses: 200 page shown; 303/307 redirect (signed out → /signin); 401 API without
 * credentials; 403 refused; 400/422 allowed in but the (deliberately incomplete) input refused;
 * 'ok' = any 2xx; 'in' = allowed past authorisation (not 401/403, below 500).
 */
import { readdirSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/seed/demo-users';
import { PlantModel, TuningSet } from '../../src/lib/server/db/models';
import { createRevision, discardRevision, requestChanges, revisionTemplate, submitForReview } from '../../src/lib/server/revisions';
import { actingByEmail, closeServices, quietApprovedModel } from '../helpers/review';

const BASE_URL = process.env.BASE_URL;
if (!BASE_URL) throw new Error('BASE_URL is not set: run through `npm test`, or start the server and set BASE_URL.');
const BASE = BASE_URL.replace(/\/$/, '');
const ORIGIN = new URL(BASE).origin;

type Who = 'signedOut' | 'viewer' | 'engineer' | 'reviewer' | 'admin';
const WHO: Who[] = ['signedOut', 'viewer', 'engineer', 'reviewer', 'admin'];
type Expect = number | 'ok' | 'in';
type Expected = Record<Who, Expect>;

interface Case {
	method: 'GET' | 'POST';
	/** Path with placeholders {model}, {asset}, {site}, {area}, {user}. */
	path: string;
	form?: Record<string, string>;
	json?: unknown;
	expect: Expected;
	/** For 303: where the redirect must point (prefix). */
	signedOutTo?: string;
}

const everyone = (s: Expect): Expected => ({ signedOut: s, viewer: s, engineer: s, reviewer: s, admin: s });
const signedIn = (s: Expect, out: Expect = 303): Expected => ({ signedOut: out, viewer: s, engineer: s, reviewer: s, admin: s });
const adminOnly = (adminStatus: Expect): Expected => ({ signedOut: 303, viewer: 403, engineer: 403, reviewer: 403, admin: adminStatus });
const api = (s: Expect): Expected => signedIn(s, 401);

/** Route id (as SvelteKit names it) → the requests to try. */
const TABLE: Record<string, Case[]> = {
	'/': [{ method: 'GET', path: '/', expect: everyone(307) }],
	'/(auth)/signin': [
		{ method: 'GET', path: '/signin', expect: { ...everyone(303), signedOut: 200 } },
		// Signed in, the page's load sends the person on to the register after the refused attempt.
		{ method: 'POST', path: '/signin', form: { email: '', password: '' }, expect: { ...everyone(303), signedOut: 400 } }
	],
	'/(auth)/signout': [{ method: 'GET', path: '/signout', expect: { ...everyone(200), signedOut: 303 } }],
	'/(app)/register': [{ method: 'GET', path: '/register', expect: signedIn(200), signedOutTo: '/signin?redirectTo=%2Fregister' }],
	'/(app)/models/[id=id]': [{ method: 'GET', path: '/models/{model}', expect: signedIn(200), signedOutTo: '/signin?redirectTo=' }],
	'/(app)/assets/[id=id]': [{ method: 'GET', path: '/assets/{asset}', expect: signedIn(200) }],
	'/(app)/guide/[slug]': [
		{ method: 'GET', path: '/guide/step-response', expect: signedIn(200) },
		{ method: 'GET', path: '/guide/no-such-page', expect: signedIn(404) }
	],
	'/(app)/sites': [{ method: 'GET', path: '/sites', expect: signedIn(200) }],
	'/(app)/sites/[id=id]': [{ method: 'GET', path: '/sites/{site}', expect: signedIn(200) }],
	'/(app)/areas/[id=id]': [{ method: 'GET', path: '/areas/{area}', expect: signedIn(200) }],
	'/(app)/profile': [
		{ method: 'GET', path: '/profile', expect: signedIn(200) },
		{ method: 'POST', path: '/profile?/name', form: { name: '' }, expect: signedIn(400) },
		{ method: 'POST', path: '/profile?/createToken', form: { name: '' }, expect: signedIn(400) },
		{ method: 'POST', path: '/profile?/revokeToken', form: { tokenId: 'x' }, expect: signedIn(400) }
	],
	'/(app)/profile/password': [
		{ method: 'GET', path: '/profile/password', expect: signedIn(200) },
		{ method: 'POST', path: '/profile/password', form: { current: '' }, expect: signedIn(400) }
	],
	'/(app)/admin/users': [
		{ method: 'GET', path: '/admin/users', expect: adminOnly(200) },
		{ method: 'POST', path: '/admin/users?/create', form: { email: 'not-an-email', name: '', role: 'viewer' }, expect: adminOnly(400) },
		{ method: 'POST', path: '/admin/users?/role', form: { userId: '0', role: 'admin' }, expect: adminOnly(400) },
		{ method: 'POST', path: '/admin/users?/deactivate', form: { userId: '0' }, expect: adminOnly(400) },
		{ method: 'POST', path: '/admin/users?/reactivate', form: { userId: '0' }, expect: adminOnly(400) },
		{ method: 'POST', path: '/admin/users?/reset', form: { userId: '0' }, expect: adminOnly(400) },
		// A real target: the demo viewer, "changed" to the role they already have (no change for the
		// admin, so other tests keep their data); everyone else is refused before anything happens.
		{ method: 'POST', path: '/admin/users?/role', form: { userId: '{user}', role: 'viewer' }, expect: adminOnly(200) }
	],
	// Review screens (issue 5). {rev} is the approved revision of {model}; {ownRev} is a revision in
	// review written by the demo reviewer (of model {ownModel}); {tuningSet} is an approved tuning set.
	// Forms post real values, so every refusal below comes from the permission or state check.
	'/(app)/review': [{ method: 'GET', path: '/review', expect: { signedOut: 303, viewer: 403, engineer: 200, reviewer: 200, admin: 200 } }],
	'/(app)/review/tuning-sets/[id=id]': [
		{ method: 'GET', path: '/review/tuning-sets/{tuningSet}', expect: signedIn(200) },
		// Viewers and engineers may not approve, administrators never do; a reviewer is refused by state (already approved).
		{ method: 'POST', path: '/review/tuning-sets/{tuningSet}?/approve', form: { comment: 'ok' }, expect: { signedOut: 303, viewer: 403, engineer: 403, reviewer: 409, admin: 403 } }
	],
	'/(app)/models/[id=id]/history': [{ method: 'GET', path: '/models/{model}/history', expect: signedIn(200) }],
	'/(app)/models/[id=id]/revisions/[rev=id]': [
		{ method: 'GET', path: '/models/{model}/revisions/{rev}', expect: signedIn(200) },
		{ method: 'POST', path: '/models/{model}/revisions/{rev}?/approve', form: { comment: 'ok' }, expect: { signedOut: 303, viewer: 403, engineer: 403, reviewer: 409, admin: 403 } },
		{ method: 'POST', path: '/models/{model}/revisions/{rev}?/submit', form: {}, expect: { signedOut: 303, viewer: 403, engineer: 409, reviewer: 409, admin: 403 } },
		{ method: 'POST', path: '/models/{model}/revisions/{rev}?/discard', form: {}, expect: { signedOut: 303, viewer: 403, engineer: 409, reviewer: 409, admin: 403 } },
		// A date in the past: allowed roles get past the permission check and are refused on the date (nothing written).
		{ method: 'POST', path: '/models/{model}/revisions/{rev}?/revalidate', form: { revalidateBy: '2001-01-01' }, expect: { signedOut: 303, viewer: 403, engineer: 403, reviewer: 422, admin: 403 } },
		// The reviewer's own revision: four-eyes refuses them; the viewer cannot even see a draft (404).
		{ method: 'POST', path: '/models/{ownModel}/revisions/{ownRev}?/approve', form: { comment: 'self-approval attempt' }, expect: { signedOut: 303, viewer: 404, engineer: 403, reviewer: 403, admin: 403 } },
		{ method: 'POST', path: '/models/{ownModel}/revisions/{ownRev}?/requestChanges', form: { comment: 'self review' }, expect: { signedOut: 303, viewer: 404, engineer: 403, reviewer: 403, admin: 403 } },
		// A revision id of another model is not found under this model's address.
		{ method: 'GET', path: '/models/{model}/revisions/{ownRev}', expect: { signedOut: 303, viewer: 404, engineer: 404, reviewer: 404, admin: 404 } }
	],
	'/(app)/admin/audit': [{ method: 'GET', path: '/admin/audit', expect: adminOnly(200) }],
	'/(app)/admin/audit/export.csv': [
		{ method: 'GET', path: '/admin/audit/export.csv', expect: adminOnly(200) },
		{ method: 'GET', path: '/admin/audit/export.csv?from=2026-02-30', expect: adminOnly(400) }
	],
	'/(app)/admin/mail': [
		{ method: 'GET', path: '/admin/mail', expect: adminOnly(200) },
		{ method: 'POST', path: '/admin/mail?/retry', form: { id: 'none' }, expect: adminOnly(400) }
	],
	'/(app)/admin/mail/[id=id]': [{ method: 'GET', path: '/admin/mail/999999999', expect: adminOnly(404) }],
	// Model form, export files and the models/assets API (issue 4). Forms post incomplete values:
	// engineers and reviewers get past the permission check and are refused on the input (nothing written).
	'/(app)/models/new': [
		{ method: 'GET', path: '/models/new', expect: { signedOut: 303, viewer: 403, engineer: 200, reviewer: 200, admin: 403 } },
		{ method: 'POST', path: '/models/new?/save', form: { title: '' }, expect: { signedOut: 303, viewer: 403, engineer: 400, reviewer: 400, admin: 403 } },
		{ method: 'POST', path: '/models/new?/refresh', form: { structure: 'ipdt' }, expect: { signedOut: 303, viewer: 403, engineer: 200, reviewer: 200, admin: 403 } }
	],
	'/(app)/models/[id=id]/revise': [
		{ method: 'GET', path: '/models/{model}/revise', expect: { signedOut: 303, viewer: 403, engineer: 200, reviewer: 200, admin: 403 } },
		{ method: 'POST', path: '/models/{model}/revise?/save', form: { changeSummary: '' }, expect: { signedOut: 303, viewer: 403, engineer: 400, reviewer: 400, admin: 403 } }
	],
	'/(app)/models/[id=id]/export.json': [{ method: 'GET', path: '/models/{model}/export.json', expect: signedIn(200) }],
	'/(app)/models/[id=id]/export.csv': [{ method: 'GET', path: '/models/{model}/export.csv', expect: signedIn(200) }],
	'/api/v1/models': [
		{ method: 'GET', path: '/api/v1/models', expect: api(200) },
		{ method: 'GET', path: '/api/v1/models?sort=colour', expect: api(400) }
	],
	'/api/v1/models/[id]': [
		{ method: 'GET', path: '/api/v1/models/{model}', expect: api(200) },
		{ method: 'GET', path: '/api/v1/models/999999999', expect: api(404) }
	],
	'/api/v1/assets/[id]': [{ method: 'GET', path: '/api/v1/assets/{asset}', expect: api(200) }],
	'/theme': [{ method: 'POST', path: '/theme', form: { theme: 'light', returnTo: '/register' }, expect: everyone(303) }],
	// The JSON API (engine engineers): the calculator is for every signed-in role.
	'/api/v1/analysis': [
		{
			method: 'POST',
			path: '/api/v1/analysis',
			json: { plant: { num: [2], den: [10, 1], delay: 1 }, controller: { type: 'PI', kp: 1, ti: 10 } },
			expect: api('in')
		}
	],
	'/api/v1/tuning': [
		{
			method: 'POST',
			path: '/api/v1/tuning',
			json: { plant: { structure: 'fopdt', k: 2, tau: 10, theta: 1 }, rule: 'simc', controller: 'PI' },
			expect: api('in')
		}
	],
	'/api/v1/design': [{ method: 'POST', path: '/api/v1/design', json: {}, expect: api('in') }]
};

/** Route ids of every page and endpoint under src/routes. */
function discoverRoutes(): string[] {
	const root = join(process.cwd(), 'src', 'routes');
	const files = readdirSync(root, { recursive: true }) as string[];
	const ids = new Set<string>();
	for (const f of files) {
		const name = f.split(sep).pop()!;
		if (!/^\+(page\.svelte|page\.server\.ts|page\.ts|server\.ts)$/.test(name)) continue;
		const dir = relative(root, join(root, f, '..')).split(sep).join('/');
		ids.add(dir ? `/${dir}` : '/');
	}
	return [...ids].sort();
}

const cookies: Partial<Record<Who, string>> = {};
const ids: Record<string, string> = {};
let viewerUserId = '';
let ownRevision: { modelId: number; revisionId: number; acting: Awaited<ReturnType<typeof actingByEmail>> } | null = null;

async function request(who: Who, c: Pick<Case, 'method' | 'form' | 'json'> & { path: string }, extra: Record<string, string> = {}): Promise<Response> {
	const headers: Record<string, string> = { Accept: 'text/html', Origin: ORIGIN, ...extra };
	const cookie = cookies[who];
	if (cookie) headers.Cookie = cookie;
	let body: string | undefined;
	if (c.form) {
		headers['Content-Type'] = 'application/x-www-form-urlencoded';
		body = new URLSearchParams(c.form).toString();
	} else if (c.json !== undefined) {
		headers['Content-Type'] = 'application/json';
		headers.Accept = 'application/json';
		body = JSON.stringify(c.json);
	}
	return fetch(BASE + c.path, { method: c.method, headers, body, redirect: 'manual' });
}

async function signInAs(email: string, password: string): Promise<string> {
	const res = await fetch(`${BASE}/signin`, {
		method: 'POST',
		headers: { Origin: ORIGIN, Accept: 'text/html', 'Content-Type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams({ email, password }).toString(),
		redirect: 'manual'
	});
	expect(res.status, `sign-in of ${email}`).toBe(303);
	const session = res.headers.getSetCookie().find((c) => /^(__Secure-)?authjs\.session-token=/.test(c));
	expect(session, `session cookie for ${email}`).toBeTruthy();
	return session!.split(';')[0];
}

async function linkIds(who: Who, path: string, pattern: RegExp): Promise<string[]> {
	const res = await request(who, { method: 'GET', path });
	expect(res.status, `GET ${path} as ${who}`).toBe(200);
	const html = await res.text();
	return [...html.matchAll(pattern)].map((m) => m[1]);
}

function fill(path: string): string {
	return path.replace(/\{(\w+)\}/g, (_, key: string) => {
		const v = key === 'user' ? viewerUserId : ids[key];
		if (!v) throw new Error(`No ${key} id found in the demo data for ${path}`);
		return v;
	});
}

function matches(status: number, expected: Expect): boolean {
	if (expected === 'ok') return status >= 200 && status < 300;
	if (expected === 'in') return status !== 401 && status !== 403 && status < 500;
	return status === expected;
}

beforeAll(async () => {
	for (const who of WHO) {
		if (who === 'signedOut') continue;
		const demo = DEMO_USERS.find((u) => u.role === who)!;
		cookies[who] = await signInAs(demo.email, demo.password);
	}
	// Ids from the pages themselves: a model the viewer can see (approved), its asset, a site, an area.
	ids.model = (await linkIds('viewer', '/register', /href="\/models\/(\d+)"/g))[0];
	ids.site = (await linkIds('viewer', '/sites', /href="\/sites\/(\d+)"/g))[0];
	ids.area = (await linkIds('viewer', `/sites/${ids.site}`, /href="\/areas\/(\d+)"/g))[0];
	ids.asset =
		(await linkIds('viewer', '/register', /href="\/assets\/(\d+)"/g))[0] ??
		(await linkIds('viewer', `/areas/${ids.area}`, /href="\/assets\/(\d+)"/g))[0];
	// Review screens: the approved revision of {model}, an approved tuning set, and a revision in
	// review written by the demo reviewer (through the services, as the reviewer would through the pages).
	const reviewerActing = await actingByEmail(DEMO_USERS.find((u) => u.role === 'reviewer')!.email);
	ids.rev = String((await PlantModel.findByPk(Number(ids.model)))?.approved_revision_id ?? '');
	ids.tuningSet = String((await TuningSet.findOne({ where: { state: 'approved' }, order: [['id', 'ASC']] }))?.id ?? '');
	const quiet = await quietApprovedModel(['fopdt', 'sopdt', 'ipdt'], [Number(ids.model)]);
	const template = await revisionTemplate(reviewerActing, quiet.modelId);
	const own = await createRevision(reviewerActing, quiet.modelId, { ...template.values, changeSummary: 'Authorisation test: a revision by the reviewer.' });
	await submitForReview(reviewerActing, own.revision.id);
	ownRevision = { modelId: quiet.modelId, revisionId: own.revision.id, acting: reviewerActing };
	ids.ownModel = String(quiet.modelId);
	ids.ownRev = String(own.revision.id);
	// The demo viewer's id, from their row on the users page.
	const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!;
	const usersPage = await (await request('admin', { method: 'GET', path: '/admin/users' })).text();
	const row = usersPage.split('<tr').find((r) => r.includes(viewer.email));
	viewerUserId = row?.match(/name="userId" value="(\d+)"/)?.[1] ?? '';
}, 60_000);

afterAll(async () => {
	for (const k of Object.keys(cookies)) delete cookies[k as Who];
	// Put the reviewer's test revision out of the way: another reviewer sends it back, its author discards it.
	if (ownRevision) {
		const other = await actingByEmail(DEMO_USERS.filter((u) => u.role === 'reviewer')[1].email);
		await requestChanges(other, ownRevision.revisionId, { comment: 'Authorisation test revision: not for use.' });
		await discardRevision(ownRevision.acting, ownRevision.revisionId, { comment: 'Authorisation test revision.' });
	}
	await closeServices();
});

describe('every route is in the authorisation table', () => {
	const routes = discoverRoutes();
	it('finds the routes', () => {
		expect(routes).toContain('/(auth)/signin');
		expect(routes).toContain('/(app)/admin/users');
	});
	for (const id of routes) {
		it(`${id} has expectations`, () => {
			expect(TABLE[id], `route ${id} is not in tests/browser/authz.spec.ts TABLE: add who may use it`).toBeDefined();
		});
	}
});

describe('expected status per role', () => {
	for (const id of discoverRoutes()) {
		for (const c of TABLE[id] ?? []) {
			for (const who of WHO) {
				it(`${c.method} ${c.path} as ${who} → ${c.expect[who]}`, async () => {
					const form = c.form ? Object.fromEntries(Object.entries(c.form).map(([k, v]) => [k, fill(v)])) : undefined;
					const res = await request(who, { ...c, form, path: fill(c.path) });
					expect(matches(res.status, c.expect[who]), `${c.method} ${c.path} as ${who}: got ${res.status}`).toBe(true);
					if (who === 'signedOut' && res.status === 303 && id.startsWith('/(app)')) {
						expect(res.headers.get('location')).toMatch(/^\/signin\?redirectTo=/);
						if (c.signedOutTo) expect(res.headers.get('location')!.startsWith(c.signedOutTo)).toBe(true);
					}
					if (res.status === 401) {
						expect(res.headers.get('content-type')).toMatch(/application\/json/);
						expect((await res.json()).error).toBe('unauthenticated');
					}
				});
			}
		}
	}
});

describe('API tokens and the API guard', () => {
	it('answers 401 JSON without credentials and with a bad token, lets a valid token through', async () => {
		const path = '/api/v1/nothing-here';
		expect((await request('signedOut', { method: 'GET', path })).status).toBe(401);
		const bad = await request('signedOut', { method: 'GET', path }, { Authorization: 'Bearer llt_abcdefgh_' + 'x'.repeat(43) });
		expect(bad.status).toBe(401);
		expect((await bad.json()).message).toMatch(/token is not valid/);

		// Create a token as the viewer through the profile form; it is shown once in the page.
		const created = await request('viewer', { method: 'POST', path: '/profile?/createToken', form: { name: 'authz check', lifetime: '30' } });
		expect(created.status).toBe(200);
		const token = (await created.text()).match(/llt_[a-z0-9]{8}_[A-Za-z0-9_-]{43}/)?.[0];
		expect(token).toBeTruthy();
		const ok = await request('signedOut', { method: 'GET', path }, { Authorization: `Bearer ${token}` });
		expect(ok.status).toBe(404);
		// A token opens the API only, never the pages.
		const page = await request('signedOut', { method: 'GET', path: '/register' }, { Authorization: `Bearer ${token}` });
		expect(page.status).toBe(303);
	});

	it('refuses cross-site writes made with a session cookie', async () => {
		const res = await request('engineer', { method: 'POST', path: '/api/v1/anything', json: {} }, { Origin: 'https://elsewhere.example' });
		expect(res.status).toBe(403);
		expect((await res.json()).error).toBe('cross_site');
		// SvelteKit itself refuses cross-site form posts.
		const form = await request('admin', { method: 'POST', path: '/admin/users?/create', form: { email: 'x@y.example', name: 'X', role: 'admin' } }, { Origin: 'https://elsewhere.example' });
		expect(form.status).toBe(403);
	});

	it('hides Auth.js’s own endpoints', async () => {
		for (const path of ['/auth/session', '/auth/csrf', '/auth/providers', '/auth/callback/credentials', '/auth/signin']) {
			expect((await request('signedOut', { method: 'GET', path })).status, path).toBe(404);
		}
		const post = await request('signedOut', { method: 'POST', path: '/auth/callback/credentials', form: { email: DEMO_USERS[0].email, password: DEMO_USERS[0].password } });
		expect(post.status).toBe(404);
	});
});

describe('security headers and cookie flags', () => {
	const common = (res: Response) => {
		expect(res.headers.get('x-content-type-options')).toBe('nosniff');
		expect(res.headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin');
		expect(res.headers.get('x-frame-options')).toBe('DENY');
		expect(res.headers.get('permissions-policy')).toMatch(/camera=\(\)/);
		expect(res.headers.get('content-security-policy')).toMatch(/frame-ancestors 'none'/);
		if (ORIGIN.startsWith('http:')) expect(res.headers.get('strict-transport-security')).toBeNull();
	};
	it('on pages (CSP from kit: nonce scripts, inline styles allowed for KaTeX)', async () => {
		const res = await request('viewer', { method: 'GET', path: '/register' });
		common(res);
		const csp = res.headers.get('content-security-policy')!;
		expect(csp).toMatch(/script-src 'self' 'nonce-/);
		expect(csp).toMatch(/style-src 'self' 'unsafe-inline'/);
		expect(csp).toMatch(/object-src 'none'/);
		expect(csp).not.toMatch(/unsafe-eval/);
		expect(res.headers.get('cache-control')).toBe('private, no-store');
	});
	it('on redirects, API errors and the sign-in page', async () => {
		common(await request('signedOut', { method: 'GET', path: '/register' }));
		common(await request('signedOut', { method: 'GET', path: '/api/v1/analysis' }));
		common(await request('signedOut', { method: 'GET', path: '/signin' }));
		common(await request('signedOut', { method: 'GET', path: '/auth/session' }));
	});
	it('the session cookie is HttpOnly and SameSite=Lax (Secure only over https)', async () => {
		const demo = DEMO_USERS[0];
		const res = await fetch(`${BASE}/signin`, {
			method: 'POST',
			headers: { Origin: ORIGIN, Accept: 'text/html', 'Content-Type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ email: demo.email, password: demo.password }).toString(),
			redirect: 'manual'
		});
		const session = res.headers.getSetCookie().find((c) => /authjs\.session-token=/.test(c))!;
		expect(session).toMatch(/;\s*HttpOnly/i);
		expect(session).toMatch(/;\s*SameSite=Lax/i);
		expect(session).toMatch(/;\s*Path=\//i);
		if (ORIGIN.startsWith('https:')) expect(session).toMatch(/;\s*Secure/i);
		else expect(session).not.toMatch(/;\s*Secure/i);
	});
});
