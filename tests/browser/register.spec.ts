/**
 * The register and the model page in Debian's Chromium against the running server (BASE_URL,
 * started by `npm test` with the demo data). Journeys: filter by site and structure, the text
 * filter as you type, sorting, the back button, opening a model and reading its parameters and the
 * caution; the same register without JavaScript; the theme choice remembered. Selectors are roles
 * and labels only. Screenshots of the register and a model page in both themes go to `screenshots/`.
 */
import { mkdirSync } from 'node:fs';
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
let browser: Browser;

beforeAll(async () => {
	mkdirSync(SHOTS, { recursive: true });
	browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
});

afterAll(async () => {
	await browser?.close();
});

async function signedIn(javaScriptEnabled = true): Promise<{ context: BrowserContext; page: Page }> {
	const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1440, height: 900 }, javaScriptEnabled });
	const page = await context.newPage();
	await page.goto('/signin', { waitUntil: 'networkidle' });
	await page.getByLabel('Email').fill(engineer.email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL((u) => u.pathname === '/register');
	await page.waitForLoadState('networkidle');
	return { context, page };
}

const registerTable = (page: Page) => page.getByRole('table', { name: /^Plant models/ });

/** The text of one column (by its heading) for every body row of the register table. */
async function column(page: Page, heading: RegExp): Promise<string[]> {
	const table = registerTable(page);
	const headers = await table.getByRole('columnheader').allInnerTexts();
	const index = headers.findIndex((h) => heading.test(h));
	expect(index, `column ${heading} exists`).toBeGreaterThanOrEqual(0);
	const rows = table.getByRole('row');
	const count = await rows.count();
	const out: string[] = [];
	for (let i = 1; i < count; i++) out.push((await rows.nth(i).getByRole('cell').nth(index).innerText()).trim());
	return out;
}

/** "5.2 min" → 312, "45 s" → 45 (seconds); the dash → null. */
function seconds(text: string): number | null {
	const m = /^(-?[0-9.e+-]+)\s*(s|min)\b/.exec(text.trim());
	if (!m) return null;
	return Number(m[1]) * (m[2] === 'min' ? 60 : 1);
}

const firstLineNumber = (text: string) => {
	const v = Number(text.split('\n')[0].trim());
	return Number.isFinite(v) ? v : null;
};

function isSorted(values: number[], dir: 'asc' | 'desc'): boolean {
	return values.every((v, i) => i === 0 || (dir === 'asc' ? values[i - 1] <= v : values[i - 1] >= v));
}

async function waitForQuery(page: Page, check: (p: URLSearchParams) => boolean) {
	await page.waitForURL((u) => check(new URL(u).searchParams));
	await page.waitForLoadState('networkidle');
}

describe('register journeys', () => {
	it('filters by site and structure, sorts, goes back, opens a model, in both themes', async () => {
		const { context, page } = await signedIn();
		try {
			await expect(page.getByRole('heading', { level: 1, name: 'Register' }).isVisible()).resolves.toBe(true);
			const allCount = await registerTable(page).getByRole('row').count();
			expect(allCount).toBeGreaterThan(2);

			// Light theme first, chosen in the header; the screenshot is the unfiltered register.
			await page.getByRole('button', { name: 'Light', exact: true }).click();
			await page.getByRole('button', { name: 'Light', exact: true, pressed: true }).waitFor({ timeout: 10_000 });
			await page.screenshot({ path: `${SHOTS}/register-light.png` });

			// Site filter: every row's site is the chosen one.
			const siteSelect = page.getByLabel('Site', { exact: true });
			const siteOptions = (await siteSelect.getByRole('option').allInnerTexts()).filter((t) => t !== 'All sites');
			expect(siteOptions.length).toBeGreaterThanOrEqual(1);
			const siteName = siteOptions[0];
			await siteSelect.selectOption({ label: siteName });
			await waitForQuery(page, (p) => p.has('site'));
			const places = await column(page, /area/i);
			expect(places.length).toBeGreaterThan(0);
			for (const place of places) expect(place).toContain(siteName);

			// Structure filter on top: every row says the structure in plain words.
			await page.getByLabel('Structure').selectOption({ label: 'First order + dead time' });
			await waitForQuery(page, (p) => p.get('structure') === 'fopdt' && p.has('site'));
			const structures = await column(page, /structure/i);
			expect(structures.length).toBeGreaterThan(0);
			for (const s of structures) expect(s).toBe('First order + dead time');

			// Sort by gain, then the other way: the gains follow (all static gains under this filter).
			const gainHeader = registerTable(page).getByRole('columnheader', { name: /gain/i });
			await gainHeader.getByRole('link').click();
			await waitForQuery(page, (p) => p.get('sort') === 'gain' && !p.has('dir'));
			await expect(gainHeader.getAttribute('aria-sort')).resolves.toBe('ascending');
			const up = (await column(page, /gain/i)).map(firstLineNumber).filter((v): v is number => v !== null);
			expect(isSorted(up, 'asc')).toBe(true);
			await gainHeader.getByRole('link').click();
			await waitForQuery(page, (p) => p.get('sort') === 'gain' && p.get('dir') === 'desc');
			await expect(gainHeader.getAttribute('aria-sort')).resolves.toBe('descending');
			const down = (await column(page, /gain/i)).map(firstLineNumber).filter((v): v is number => v !== null);
			expect(down).toEqual([...up].reverse());

			// The back button returns to the previous list, filters and all.
			await page.goBack();
			await waitForQuery(page, (p) => p.get('sort') === 'gain' && !p.has('dir'));
			await expect(page.getByLabel('Structure').inputValue()).resolves.toBe('fopdt');
			await page.goBack();
			await waitForQuery(page, (p) => !p.has('sort') && p.get('structure') === 'fopdt');

			// Dead time sorted descending across display units (s and min), compared in seconds.
			const deadHeader = registerTable(page).getByRole('columnheader', { name: /dead time/i });
			await deadHeader.getByRole('link').click();
			await waitForQuery(page, (p) => p.get('sort') === 'theta');
			await deadHeader.getByRole('link').click();
			await waitForQuery(page, (p) => p.get('sort') === 'theta' && p.get('dir') === 'desc');
			const dead = (await column(page, /dead time/i)).map(seconds).filter((v): v is number => v !== null);
			expect(dead.length).toBeGreaterThan(0);
			expect(isSorted(dead, 'desc')).toBe(true);

			// Open the first model: parameters with units, the transfer function and the caution.
			const firstModel = registerTable(page).getByRole('row').nth(1).getByRole('link').nth(1);
			const title = (await firstModel.innerText()).trim();
			await firstModel.click();
			await page.waitForURL((u) => /^\/models\/\d+$/.test(new URL(u).pathname));
			await page.waitForLoadState('networkidle');
			await expect(page.getByRole('heading', { level: 1, name: title }).isVisible()).resolves.toBe(true);
			const params = page.getByRole('table', { name: 'Identified parameters' });
			for (const name of ['Process gain', 'Time constant', 'Dead time']) {
				const row = params.getByRole('row', { name: new RegExp(name) });
				await expect(row.isVisible()).resolves.toBe(true);
				const text = await row.innerText();
				expect(text).toMatch(/[0-9]/);
				expect(text).toMatch(name === 'Process gain' ? /\// : /\b(s|min)\b/);
			}
			const caution = page.getByRole('complementary', { name: 'Before you change a live loop' });
			await expect(caution.isVisible()).resolves.toBe(true);
			await expect(caution.innerText()).resolves.toMatch(/site’s procedures/);
			await expect(page.getByRole('region', { name: 'Transfer function' }).innerText()).resolves.toMatch(/G\(s\)/);
			await page.screenshot({ path: `${SHOTS}/model-light.png`, fullPage: true });

			// Dark theme, remembered across pages and reloads.
			await page.getByRole('button', { name: 'Dark', exact: true }).click();
			await page.getByRole('button', { name: 'Dark', exact: true, pressed: true }).waitFor({ timeout: 10_000 });
			await page.reload({ waitUntil: 'networkidle' });
			await expect(page.getByRole('button', { name: 'Dark', exact: true }).getAttribute('aria-pressed')).resolves.toBe('true');
			// The dark canvas colour of src/app.css paints the whole page.
			const bg = await page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
			expect(bg).toBe('rgb(10, 18, 20)');
			await page.screenshot({ path: `${SHOTS}/model-dark.png`, fullPage: true });
			await page.goto('/register', { waitUntil: 'networkidle' });
			await page.screenshot({ path: `${SHOTS}/register-dark.png` });
		} finally {
			await context.close();
		}
	});

	it('applies the text filter as you type and keeps it in the URL', async () => {
		const { context, page } = await signedIn();
		try {
			const tags = await column(page, /tag/i);
			const tag = tags[0].split('\n')[0].trim();
			const fragment = tag.slice(-4).toLowerCase();
			const find = page.getByRole('searchbox', { name: 'Find' });
			await find.click();
			await find.pressSequentially(fragment, { delay: 40 });
			await waitForQuery(page, (p) => p.get('q') === fragment);
			await expect(find.evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			const rows = registerTable(page).getByRole('row');
			const n = await rows.count();
			expect(n).toBeGreaterThan(1);
			for (let i = 1; i < n; i++) expect((await rows.nth(i).innerText()).toLowerCase()).toContain(fragment);

			// Nothing matches: the empty state says what to do next.
			await find.fill('no such tag zz');
			await waitForQuery(page, (p) => p.get('q') === 'no such tag zz');
			await expect(page.getByRole('heading', { name: 'No models match these filters' }).isVisible()).resolves.toBe(true);
			await expect(page.getByRole('link', { name: 'clear all filters' }).getAttribute('href')).resolves.toBe('/register');
		} finally {
			await context.close();
		}
	});

	it('works without JavaScript: the filter form, sorting links and paging are plain links and GET forms', async () => {
		const { context, page } = await signedIn(false);
		try {
			await page.getByLabel('Structure').selectOption('ipdt');
			await page.getByRole('button', { name: 'Apply' }).click();
			await page.waitForURL((u) => new URL(u).searchParams.get('structure') === 'ipdt');
			const structures = await column(page, /structure/i);
			expect(structures.length).toBeGreaterThan(0);
			for (const s of structures) expect(s).toBe('Integrating + dead time');
			await expect(page.getByLabel('Structure').inputValue()).resolves.toBe('ipdt');

			// A bad link parameter is named and left out; the list still shows.
			await page.goto('/register?sort=colour&page=0', { waitUntil: 'load' });
			const notice = page.getByRole('status').filter({ hasText: 'could not be used' });
			await expect(notice.innerText()).resolves.toMatch(/sort is not a sortable column[\s\S]*page must be 1 or more/);
			await expect(registerTable(page).isVisible()).resolves.toBe(true);

			// The theme choice is a form post too.
			await page.getByRole('button', { name: 'Dark', exact: true }).click();
			await page.waitForURL((u) => new URL(u).pathname === '/register');
			await expect(page.getByRole('button', { name: 'Dark', exact: true }).getAttribute('aria-pressed')).resolves.toBe('true');
		} finally {
			await context.close();
		}
	});

	it('is usable from the keyboard: the skip link comes first and focus is visible', async () => {
		const { context, page } = await signedIn();
		try {
			await page.keyboard.press('Tab');
			const skip = page.getByRole('link', { name: 'Skip to content' });
			await expect(skip.evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			await expect(skip.isVisible()).resolves.toBe(true);
			await page.keyboard.press('Enter');
			await expect(page.getByRole('main').evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			// The next stops are inside the main content (an engineer's "New model" action, then the
			// text filter), skipping the header.
			await page.keyboard.press('Tab');
			await expect(page.getByRole('link', { name: 'New model' }).evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			await page.keyboard.press('Tab');
			const find = page.getByRole('searchbox', { name: 'Find' });
			await expect(find.evaluate((el) => el === document.activeElement)).resolves.toBe(true);
			const outline = await find.evaluate((el) => getComputedStyle(el).outlineStyle);
			expect(outline).toBe('solid');
			await page.screenshot({ path: `${SHOTS}/register-keyboard-focus.png` });
		} finally {
			await context.close();
		}
	});

	it('answers a missing model with the not-found page', async () => {
		const { context, page } = await signedIn();
		try {
			const response = await page.goto('/models/4000000000', { waitUntil: 'load' });
			expect(response?.status()).toBe(404);
			await expect(page.getByRole('heading', { level: 1, name: 'Not found' }).isVisible()).resolves.toBe(true);
			await expect(page.getByRole('link', { name: 'Go to the register' }).isVisible()).resolves.toBe(true);
		} finally {
			await context.close();
		}
	});
});
