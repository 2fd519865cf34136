/**
 * The sign-in page's load: demo sign-ins appear only with DEMO=1; the return path is kept only
 * when it is a same-origin relative path; someone already signed in goes on at once.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { isRedirect } from '@sveltejs/kit';
import { load } from './+page.server';
import { resetEnvCache } from '$lib/server/env';
import { DEMO_USERS } from '$lib/server/seed/demo-users';

const saved = process.env.DEMO;
afterEach(() => {
	if (saved === undefined) delete process.env.DEMO;
	else process.env.DEMO = saved;
	resetEnvCache();
});

function run(url: string, user: App.Locals['user'] = null) {
	return load({ locals: { user, authMethod: user ? 'session' : null }, url: new URL(url) } as never) as Promise<{
		redirectTo: string | null;
		signedOut: boolean;
		demoUsers: { email: string; password: string }[];
	}>;
}

describe('sign-in page load', () => {
	it('lists no demo sign-ins unless DEMO=1', async () => {
		delete process.env.DEMO;
		resetEnvCache();
		expect((await run('http://127.0.0.1/signin')).demoUsers).toEqual([]);
		process.env.DEMO = '0';
		resetEnvCache();
		expect((await run('http://127.0.0.1/signin')).demoUsers).toEqual([]);
	});
	it('lists every demo person with DEMO=1', async () => {
		process.env.DEMO = '1';
		resetEnvCache();
		const data = await run('http://127.0.0.1/signin?signedOut=1');
		expect(data.demoUsers.map((u) => u.email)).toEqual(DEMO_USERS.map((u) => u.email));
		expect(data.signedOut).toBe(true);
	});
	it('keeps a same-origin return path and drops any other', async () => {
		expect((await run('http://127.0.0.1/signin?redirectTo=%2Fmodels%2F4')).redirectTo).toBe('/models/4');
		expect((await run('http://127.0.0.1/signin?redirectTo=%2F%2Fevil.example')).redirectTo).toBeNull();
	});
	it('sends someone already signed in on to where they were going', async () => {
		const user = { id: 1, email: 'a@b.example', name: 'A', role: 'viewer' as const, mustChangePassword: false };
		const thrown = await run('http://127.0.0.1/signin?redirectTo=%2Fsites', user).then(
			() => null,
			(e: unknown) => e
		);
		expect(isRedirect(thrown)).toBe(true);
		expect((thrown as { location: string }).location).toBe('/sites');
	});
});
