/**
 * Sign-in journeys in Debian's Chromium against the running server (BASE_URL, started by
 * `npm test` with the demo data and DEMO=1): every demo person signs in, sees the register,
 * opens a model page and signs out; a wrong password gets the plain message; a new person's
 * one-time password forces a password change; a deactivated person is signed out at once and
 * refused at sign-in. Selectors are roles and labels only. Screenshots go to `screenshots/`.
 */
import { mkdirSync } from 'node:fs';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS, DEMO_PASSWORD } from '../../src/lib/server/seed/demo-users';

const BASE_URL = process.env.BASE_URL;
if (!BASE_URL) throw new Error('BASE_URL is not set: run through `npm test`, or start the server and set BASE_URL.');
const BASE = BASE_URL.replace(/\/$/, '');
const SHOTS = 'screenshots';
const RUN = Date.now().toString(36);

// STACK.md trap 16; Playwright gives every launch a fresh temporary profile (its own user-data-dir).
const CHROMIUM_ARGS = [
	'--headless',
	'--no-sandbox',
	'--disable-gpu',
	'--disable-quic',
	'--no-first-run',
	'--disable-background-networking',
	'--disable-component-update',
	'--disable-sync'
];

let browser: Browser;

beforeAll(async () => {
	mkdirSync(SHOTS, { recursive: true });
	browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
});

afterAll(async () => {
	await browser?.close();
});

async function fresh(): Promise<{ context: BrowserContext; page: Page }> {
	const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1280, height: 860 } });
	const page = await context.newPage();
	return { context, page };
}

/** Go to a page and wait until it is hydrated (no requests left), so typing is not reset. */
async function open(page: Page, to: string) {
	return page.goto(to, { waitUntil: 'networkidle' });
}

async function signIn(page: Page, email: string, password: string): Promise<void> {
	await open(page, '/signin');
	await page.getByLabel('Email').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

function path(page: Page): string {
	return new URL(page.url()).pathname;
}

describe('demo people sign in, see the register, open a model, sign out', () => {
	for (const demo of DEMO_USERS) {
		it(`${demo.role}: ${demo.email}`, async () => {
			const { context, page } = await fresh();
			try {
				await signIn(page, demo.email, demo.password);
				await page.waitForURL((u) => u.pathname === '/register');
				await expect(page.getByText(demo.name).first().isVisible()).resolves.toBe(true);

				const hrefs = await page.getByRole('link').evaluateAll((links) => links.map((a) => a.getAttribute('href') ?? ''));
				const modelHref = hrefs.find((h) => /^\/models\/\d+$/.test(h));
				expect(modelHref, 'the register links to at least one model').toBeTruthy();
				const response = await open(page, modelHref!);
				expect(response?.status()).toBe(200);
				await expect(page.getByRole('heading', { level: 1 }).first().isVisible()).resolves.toBe(true);

				await open(page, '/signout');
				await page.getByRole('button', { name: 'Sign out' }).click();
				await page.waitForURL((u) => u.pathname === '/signin');
				await expect(page.getByRole('status').filter({ hasText: 'You have signed out.' }).isVisible()).resolves.toBe(true);
				await open(page, '/register');
				expect(path(page)).toBe('/signin');
			} finally {
				await context.close();
			}
		});
	}
});

describe('sign-in page', () => {
	it('shows one plain message for an unknown email and for a wrong password', async () => {
		const { context, page } = await fresh();
		try {
			await signIn(page, `nobody.${RUN}@brackwater.example`, 'whatever it is');
			const alert = page.getByRole('alert');
			await alert.waitFor();
			expect(await alert.textContent()).toContain('Email or password is not right.');
			expect(path(page)).toBe('/signin');
			await page.screenshot({ path: `${SHOTS}/signin-failed.png`, fullPage: true });

			await signIn(page, DEMO_USERS[0].email, `${DEMO_PASSWORD}-wrong`);
			await alert.waitFor();
			expect((await alert.textContent())?.trim()).toBe('Email or password is not right.');
			// The email stays filled in; the password does not.
			expect(await page.getByLabel('Email').inputValue()).toBe(DEMO_USERS[0].email);
			expect(await page.getByLabel('Password').inputValue()).toBe('');
		} finally {
			await context.close();
		}
	});

	it('names the empty fields', async () => {
		const { context, page } = await fresh();
		try {
			await open(page, '/signin');
			await page.getByRole('button', { name: 'Sign in', exact: true }).click();
			await page.getByText('Enter an email address.').waitFor();
			expect(await page.getByText('Enter your password.').isVisible()).toBe(true);
		} finally {
			await context.close();
		}
	});

	it('lists the demo sign-ins (DEMO=1) and each one signs in', async () => {
		const { context, page } = await fresh();
		try {
			await open(page, '/signin');
			await page.screenshot({ path: `${SHOTS}/signin.png`, fullPage: true });
			const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!;
			await page.getByRole('button', { name: `Sign in as ${viewer.name} (Viewer)` }).click();
			await page.waitForURL((u) => u.pathname === '/register');
		} finally {
			await context.close();
		}
	});

	it('returns to the page asked for, and only to this site', async () => {
		const { context, page } = await fresh();
		try {
			await open(page, '/profile');
			expect(path(page)).toBe('/signin');
			expect(new URL(page.url()).searchParams.get('redirectTo')).toBe('/profile');
			await page.getByLabel('Email').fill(DEMO_USERS[1].email);
			await page.getByLabel('Password').fill(DEMO_PASSWORD);
			await page.getByRole('button', { name: 'Sign in', exact: true }).click();
			await page.waitForURL((u) => u.pathname === '/profile');
			await open(page, '/signout');
			await page.getByRole('button', { name: 'Sign out' }).click();
			await page.waitForURL((u) => u.pathname === '/signin');

			await open(page, '/signin?redirectTo=https%3A%2F%2Fevil.example%2F');
			await page.getByLabel('Email').fill(DEMO_USERS[1].email);
			await page.getByLabel('Password').fill(DEMO_PASSWORD);
			await page.getByRole('button', { name: 'Sign in', exact: true }).click();
			await page.waitForURL((u) => u.pathname === '/register');
			expect(new URL(page.url()).origin).toBe(new URL(BASE).origin);
		} finally {
			await context.close();
		}
	});
});

describe('administration of people', () => {
	it('a new person must change the one-time password; once deactivated they are signed out and refused', async () => {
		const admin = DEMO_USERS.find((u) => u.role === 'admin')!;
		const a = await fresh();
		const p = await fresh();
		const email = `new.starter.${RUN}@brackwater.example`;
		const name = `New Starter ${RUN}`;
		try {
			await signIn(a.page, admin.email, admin.password);
			await a.page.waitForURL((u) => u.pathname === '/register');
			await open(a.page, '/admin/users');
			await a.page.getByLabel('Email', { exact: true }).fill(email);
			await a.page.getByLabel('Name', { exact: true }).fill(name);
			await a.page.getByLabel('Role', { exact: true }).selectOption('engineer');
			await a.page.getByRole('button', { name: 'Add person' }).click();
			const otp = a.page.getByRole('status', { name: 'One-time password', exact: true });
			await otp.waitFor();
			const oneTimePassword = ((await otp.textContent()) ?? '').trim();
			expect(oneTimePassword).toMatch(/^[a-z2-9]{4}(-[a-z2-9]{4}){3}$/);
			await a.page.screenshot({ path: `${SHOTS}/admin-users.png`, fullPage: true });

			// First sign-in: the one-time password leads straight to choosing a new one.
			await signIn(p.page, email, oneTimePassword);
			await p.page.waitForURL((u) => u.pathname === '/profile/password');
			await open(p.page, '/register');
			expect(path(p.page)).toBe('/profile/password');
			await p.page.getByLabel('Current password').fill(oneTimePassword);
			await p.page.getByLabel('New password', { exact: true }).fill('short');
			await p.page.getByLabel('New password again').fill('short');
			await p.page.getByRole('button', { name: 'Save password' }).click();
			await p.page.getByText('Use at least 12 characters.').waitFor();
			await p.page.getByLabel('Current password').fill(oneTimePassword);
			await p.page.getByLabel('New password', { exact: true }).fill('glycol chiller on line two');
			await p.page.getByLabel('New password again').fill('glycol chiller on line two');
			await p.page.getByRole('button', { name: 'Save password' }).click();
			await p.page.waitForURL((u) => u.pathname === '/register');

			// The administrator deactivates them: their very next request is signed out.
			await a.page.reload({ waitUntil: 'networkidle' });
			await a.page.getByRole('button', { name: `Deactivate ${name}` }).click();
			await a.page.getByRole('status').filter({ hasText: `${name} is deactivated` }).waitFor();
			await open(p.page, '/register');
			expect(path(p.page)).toBe('/signin');

			await signIn(p.page, email, 'glycol chiller on line two');
			const alert = p.page.getByRole('alert');
			await alert.waitFor();
			expect(await alert.textContent()).toContain('This account is deactivated');
			expect(path(p.page)).toBe('/signin');

		} finally {
			await a.context.close();
			await p.context.close();
		}
	});

	it('a viewer gets the 403 page at /admin/users', async () => {
		const { context, page } = await fresh();
		try {
			const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!;
			await signIn(page, viewer.email, viewer.password);
			await page.waitForURL((u) => u.pathname === '/register');
			const response = await open(page, '/admin/users');
			expect(response?.status()).toBe(403);
			expect(await page.getByText('Only administrators can manage users.').first().isVisible()).toBe(true);
		} finally {
			await context.close();
		}
	});
});
