/**
 * The model form, export and quick filter in Debian's Chromium against the running server
 * (BASE_URL, started by `npm test` with the demo data). Journeys: an engineer records a new FOPDT
 * model — first with an invalid field (the message sits next to the field; nothing is saved, as the
 * JSON API confirms), then valid (a draft is created and its page shows it); the live preview
 * follows the typing; the model is exported as JSON (a download named after the tag) and read back
 * over the API with a personal token; the register's quick filter narrows the list from the API as
 * you type; the same form without JavaScript. Selectors are roles and labels only. A screenshot of
 * the create form goes to `screenshots/`.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_USERS } from '../../src/lib/server/seed/demo-users';

const BASE_URL = process.env.BASE_URL;
if (!BASE_URL) throw new Error('BASE_URL is not set: run through `npm test`, or start the server and set BASE_URL.');
const BASE = BASE_URL.replace(/\/$/, '');
const SHOTS = 'screenshots';

// STACK.md trap 16; every context below is a fresh profile.
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

const engineer = DEMO_USERS.find((u) => u.role === 'engineer')!;
/** Unique per run, so the journey can run again against the same server. */
const RUN = `${Date.now().toString(36).slice(-5)}${Math.floor(Math.random() * 1e4).toString(36)}`.toUpperCase();
const TITLE = `Proofer ${RUN} humidity from steam valve`;
let browser: Browser;
let createdId: number | null = null;

beforeAll(async () => {
	mkdirSync(SHOTS, { recursive: true });
	browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
});

afterAll(async () => {
	await browser?.close();
});

async function signedIn(javaScriptEnabled = true): Promise<{ context: BrowserContext; page: Page }> {
	const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1440, height: 900 }, javaScriptEnabled, acceptDownloads: true });
	const page = await context.newPage();
	await page.goto('/signin', { waitUntil: 'networkidle' });
	await page.getByLabel('Email').fill(engineer.email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL((u) => u.pathname === '/register');
	await page.waitForLoadState('networkidle');
	return { context, page };
}

/** A form field by its exact label (the preview's summary also mentions units and names). */
const field = (page: Page, name: string) => page.getByLabel(name, { exact: true });

/** The message shown next to a field (the element its aria-describedby names for errors). */
async function messageOf(page: Page, name: string): Promise<string> {
	const input = field(page, name);
	await expect(input.getAttribute('aria-invalid')).resolves.toBe('true');
	const ids = ((await input.getAttribute('aria-describedby')) ?? '').split(/\s+/).filter((id) => id.endsWith('-error'));
	expect(ids).toHaveLength(1);
	return page.locator(`[id="${ids[0]}"]`).innerText();
}

/** The API as the signed-in person sees it (the page's session cookie). */
async function api(page: Page, path: string): Promise<{ status: number; body: Record<string, any> }> {
	const res = await page.request.get(path);
	return { status: res.status(), body: (await res.json()) as Record<string, any> };
}

async function fillValidFopdt(page: Page) {
	await field(page, 'Model title').fill(TITLE);
	await field(page, 'Narrow by tag or name').fill('PIC-4201');
	await field(page, 'Asset').selectOption({ label: 'PIC-4201 — Steam header pressure' });
	await field(page, 'MV name').fill('Steam valve');
	await field(page, 'MV unit').fill('%');
	await field(page, 'MV span minimum').fill('0');
	await field(page, 'MV span maximum').fill('100');
	await field(page, 'PV name').fill('Relative humidity');
	await field(page, 'PV unit').fill('%RH');
	await field(page, 'PV span minimum').fill('40');
	await field(page, 'PV span maximum').fill('95');
	await field(page, 'Gain K').fill('0.6');
	await field(page, 'Time constant τ').fill('45');
	await field(page, 'Dead time θ').fill('12');
	await field(page, 'Test date').fill('2026-03-03');
	await field(page, 'Revalidate by').fill('2027-03-03');
	await field(page, 'Change summary').fill('First identification from the bump test of 3 March.');
}

describe('model form journeys', () => {
	it('refuses an invalid field with the message next to it and saves nothing, then saves a valid draft', async () => {
		const { context, page } = await signedIn();
		try {
			await page.getByRole('link', { name: 'New model' }).click();
			await page.waitForURL((u) => u.pathname === '/models/new');
			await page.waitForLoadState('networkidle');
			await fillValidFopdt(page);

			// The preview follows the dynamics as typed.
			const preview = page.getByRole('img', { name: /settles 0\.6 %RH away, starting after the dead time of 12 s/ });
			await preview.waitFor();
			await page.screenshot({ path: `${SHOTS}/model-form-create.png`, fullPage: true });

			await field(page, 'Time constant τ').fill('-45');
			await page.getByRole('button', { name: 'Save draft' }).click();
			await expect(messageOf(page, 'Time constant τ')).resolves.toBe('Time constant τ must be greater than zero.');
			await expect(page.getByRole('alert').innerText()).resolves.toContain('Nothing was saved');
			await expect(field(page, 'Time constant τ').evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			expect(new URL(page.url()).pathname).toBe('/models/new');
			await expect(page.getByText(/Fill in or correct Time constant τ/).isVisible()).resolves.toBe(true);
			const before = await api(page, `/api/v1/models?q=${encodeURIComponent(RUN)}`);
			expect(before.status).toBe(200);
			expect(before.body.total).toBe(0);
			await page.screenshot({ path: `${SHOTS}/model-form-invalid.png`, fullPage: true });

			// Corrected: the draft is created and its page shows it.
			await field(page, 'Time constant τ').fill('45');
			await expect(field(page, 'Time constant τ').getAttribute('aria-invalid')).resolves.toBeNull();
			await page.getByRole('button', { name: 'Save draft' }).click();
			await page.waitForURL((u) => /^\/models\/\d+$/.test(u.pathname));
			await page.waitForLoadState('networkidle');
			createdId = Number(new URL(page.url()).pathname.split('/')[2]);
			await expect(page.getByRole('heading', { level: 1 }).innerText()).resolves.toBe(TITLE);
			await expect(page.getByRole('note').filter({ hasText: 'Not approved yet' }).isVisible()).resolves.toBe(true);
			await expect(page.getByRole('link', { name: 'Edit draft' }).getAttribute('href')).resolves.toBe(`/models/${createdId}/revise`);

			const after = await api(page, `/api/v1/models/${createdId}`);
			expect(after.status).toBe(200);
			expect(after.body.revision.state).toBe('draft');
			expect(after.body.revision.parametersSeconds).toEqual({ k: 0.6, tau: 45, theta: 12 });
			expect(after.body.revision.transferFunction).toEqual({ num: [0.6], den: [45, 1], delaySeconds: 12 });
			expect(after.body.asset.tag).toBe('PIC-4201');
		} finally {
			await context.close();
		}
	});

	it('exports the model as JSON named after its tag, and answers a personal API token', async () => {
		expect(createdId, 'the create journey ran first').not.toBeNull();
		const { context, page } = await signedIn();
		try {
			await page.goto(`/models/${createdId}`, { waitUntil: 'networkidle' });
			const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export JSON' }).click()]);
			expect(download.suggestedFilename()).toBe(`PIC-4201_model-${createdId}_rev-1.json`);
			const doc = JSON.parse(readFileSync((await download.path())!, 'utf8'));
			expect(doc.format).toBe('loopledger.model/1');
			expect(doc.model).toMatchObject({ id: createdId, title: TITLE, isApproved: false });
			expect(doc.revision.parametersSeconds).toEqual({ k: 0.6, tau: 45, theta: 12 });
			expect(doc.revision.mv).toEqual({ name: 'Steam valve', unit: '%', min: 0, max: 100 });
			expect(doc.revision.provenance).toMatchObject({ method: 'step_test', testDate: '2026-03-03', revalidateBy: '2027-03-03' });
			expect(doc.caution).toMatch(/site procedures/);

			const csv = await page.request.get(`/models/${createdId}/export.csv`);
			expect(csv.headers()['content-disposition']).toBe(`attachment; filename="PIC-4201_model-${createdId}_rev-1.csv"`);
			expect(await csv.text()).toContain('\r\nparameter,tau,45,s,\r\n');

			// A personal token (made on the profile page) reads the same model without the session.
			await page.goto('/profile', { waitUntil: 'networkidle' });
			await page.getByLabel('Token name').fill(`form journey ${RUN}`);
			await page.getByRole('button', { name: 'Create token' }).click();
			const token = (await page.getByLabel('New API token').innerText()).trim();
			expect(token).toMatch(/^llt_/);
			const bare = await fetch(`${BASE}/api/v1/models/${createdId}`);
			expect(bare.status).toBe(401);
			const withToken = await fetch(`${BASE}/api/v1/models/${createdId}`, { headers: { Authorization: `Bearer ${token}` } });
			expect(withToken.status).toBe(200);
			expect(((await withToken.json()) as { model: { title: string } }).model.title).toBe(TITLE);
			const missing = await fetch(`${BASE}/api/v1/models/99999999`, { headers: { Authorization: `Bearer ${token}` } });
			expect([missing.status, ((await missing.json()) as { error: string }).error]).toEqual([404, 'not_found']);
			const bad = await fetch(`${BASE}/api/v1/models?sort=colour`, { headers: { Authorization: `Bearer ${token}` } });
			expect([bad.status, ((await bad.json()) as { field: string }).field]).toEqual([400, 'sort']);
		} finally {
			await context.close();
		}
	});

	it('narrows the register as you type, from the API, keeping the text in the address', async () => {
		const { context, page } = await signedIn();
		try {
			const asked: string[] = [];
			page.on('request', (r) => {
				const u = new URL(r.url());
				if (u.pathname === '/api/v1/models') asked.push(u.search);
			});
			const table = page.getByRole('table', { name: /^Plant models/ });
			const before = (await table.getByRole('row').count()) - 1;
			expect(before).toBeGreaterThan(5);
			const find = page.getByRole('searchbox', { name: 'Find' });
			await find.click();
			await find.pressSequentially('PIC-42', { delay: 40 });
			await page.waitForURL((u) => new URL(u).searchParams.get('q') === 'PIC-42');
			await expect.poll(async () => (await table.getByRole('row').count()) - 1).toBeLessThan(before);
			const rows = await table.getByRole('row').allInnerTexts();
			for (const r of rows.slice(1)) expect(r).toContain('PIC-42');
			// One request after the typing stopped (debounced), not one per key.
			expect(asked.length).toBeGreaterThanOrEqual(1);
			expect(asked.length).toBeLessThan('PIC-42'.length);
			expect(asked[asked.length - 1]).toContain('q=PIC-42');
			await expect(find.evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			// The address is shareable: loading it renders the same list on the server.
			await page.reload({ waitUntil: 'networkidle' });
			await expect(page.getByRole('searchbox', { name: 'Find' }).inputValue()).resolves.toBe('PIC-42');
			expect((await table.getByRole('row').count()) - 1).toBe(rows.length - 1);
		} finally {
			await context.close();
		}
	});

	it('works without JavaScript: the server checks, keeps the values and puts the messages next to the fields', async () => {
		const { context, page } = await signedIn(false);
		try {
			await page.goto('/models/new', { waitUntil: 'load' });
			await field(page, 'Model title').fill(`No script ${RUN}`);
			await page.getByRole('radio', { name: 'Integrating + dead time' }).check();
			await page.getByRole('button', { name: 'Show the fields' }).click();
			await page.waitForLoadState('load');
			await expect(field(page, 'Integrating gain Kv').count()).resolves.toBe(1);
			await expect(field(page, 'Time constant τ').count()).resolves.toBe(0);
			await expect(field(page, 'Model title').inputValue()).resolves.toBe(`No script ${RUN}`);
			await field(page, 'Integrating gain Kv').fill('fast');
			await page.getByRole('button', { name: 'Save draft' }).click();
			await page.waitForLoadState('load');
			await expect(messageOf(page, 'Integrating gain Kv')).resolves.toBe('Integrating gain Kv: enter a number.');
			await expect(messageOf(page, 'MV name')).resolves.toBe('MV name: enter a value.');
			await expect(field(page, 'Integrating gain Kv').inputValue()).resolves.toBe('fast');
			const none = await api(page, `/api/v1/models?q=${encodeURIComponent(`No script ${RUN}`)}`);
			expect(none.body.total).toBe(0);
		} finally {
			await context.close();
		}
	});
});
