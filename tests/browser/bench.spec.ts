/**
 * The bench on the model page, in Debian's Chromium against the running server (BASE_URL, demo
 * data). Journeys: open a model from the register; change Kp and see the overshoot and the plots
 * change; load a tuning rule; a form change the series form cannot represent; an unstable loop;
 * the robustness band; save a tuning set as an engineer and find it listed; a viewer sees no save
 * form; a metric's meaning on focus and its guide page; the page without JavaScript. Selectors are
 * roles and labels only. Screenshots of the model page with the bench in light and dark themes go
 * to `screenshots/`.
 */
import { mkdirSync } from 'node:fs';
import { chromium, type Browser, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_USERS } from '../../src/lib/server/seed/demo-users';

const BASE_URL = process.env.BASE_URL;
if (!BASE_URL) throw new Error('BASE_URL is not set: run through `npm test`, or start the server and set BASE_URL.');
const BASE = BASE_URL.replace(/\/$/, '');
const SHOTS = 'screenshots';

// STACK.md trap 16; every context below is a fresh profile.
const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** A demo FOPDT model of the bakery with saved tuning sets (Brackwater Provisions demo data). */
const MODEL_TITLE = 'Zone 1 air temperature from burner firing rate (bread)';

let browser: Browser;

beforeAll(async () => {
	mkdirSync(SHOTS, { recursive: true });
	browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
});

afterAll(async () => {
	await browser?.close();
});

async function signedIn(role: 'engineer' | 'viewer', options: { javaScriptEnabled?: boolean; theme?: 'light' | 'dark' } = {}): Promise<{ context: BrowserContext; page: Page }> {
	const person = DEMO_USERS.find((u) => u.role === role);
	if (!person) throw new Error(`no demo ${role}`);
	const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1440, height: 900 }, javaScriptEnabled: options.javaScriptEnabled ?? true });
	if (options.theme) await context.addCookies([{ name: 'll_theme', value: options.theme, url: BASE }]);
	const page = await context.newPage();
	await page.goto('/signin', { waitUntil: 'networkidle' });
	await page.getByLabel('Email').fill(person.email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL((u) => u.pathname === '/register');
	await page.waitForLoadState('networkidle');
	return { context, page };
}

/** Opens the model from the register's text filter and waits for the bench's first drawing. */
async function openModel(page: Page, title = MODEL_TITLE, waitForBench = true): Promise<void> {
	await page.goto(`/register?q=${encodeURIComponent(title)}`, { waitUntil: 'networkidle' });
	await page.getByRole('link', { name: title, exact: true }).first().click();
	await page.waitForURL((u) => /^\/models\/\d+$/.test(u.pathname));
	await shown(page.getByRole('heading', { level: 1, name: title }));
	if (waitForBench) await drawn(page);
}

/** Waits until the bench has drawn a result newer than `after` draws (the page's measurement hook). */
async function drawn(page: Page, after = 0): Promise<number> {
	await page.waitForFunction((n) => {
		const probe = (window as unknown as { __loopledgerBench?: { drawn: number } }).__loopledgerBench;
		return !!probe && probe.drawn > n;
	}, after);
	return page.evaluate(() => (window as unknown as { __loopledgerBench: { drawn: number } }).__loopledgerBench.drawn);
}

/** Waits until the locator (one element) is visible. */
const shown = (l: Locator, timeout = 15_000) => l.waitFor({ state: 'visible', timeout });
/** The element's text, for polling. */
const text = async (l: Locator) => (await l.innerText()).trim();

const bench = (page: Page) => page.getByRole('region', { name: 'Bench' });

/** The id of the approved revision shown, from the model's JSON document (GET /api/v1/models/:id). */
async function currentRevisionId(page: Page): Promise<string> {
	const id = /\/models\/(\d+)/.exec(page.url())?.[1];
	const res = await page.request.get(`/api/v1/models/${id}`);
	const doc = (await res.json()) as { revision: { id: number } };
	return String(doc.revision.id);
}
const setpointTable = (page: Page) => bench(page).getByRole('table', { name: /^Set-point step of/ });
/** The value cell of a metric row (by the metric's name). */
const metric = (table: Locator, name: RegExp) => table.getByRole('row', { name }).getByRole('cell');
const stepChart = (page: Page) => bench(page).getByRole('img', { name: /^Response to a set-point step/ });

async function settled(page: Page): Promise<void> {
	// Results are drawn within a few frames; wait until the count stops growing.
	let last = -1;
	for (let i = 0; i < 40; i++) {
		const now = await page.evaluate(() => (window as unknown as { __loopledgerBench: { drawn: number } }).__loopledgerBench.drawn);
		if (now === last) return;
		last = now;
		await page.waitForTimeout(150);
	}
}

describe('the bench', () => {
	it('changes the overshoot and the plots when Kp changes', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await openModel(page);
			await settled(page);
			const overshoot = metric(setpointTable(page), /^Overshoot/);
			const before = await text(overshoot);
			const picture = await stepChart(page).screenshot();
			const kp = bench(page).getByRole('textbox', { name: 'Gain Kp' });
			const kpBefore = Number((await kp.inputValue()).trim());
			expect(kpBefore).toBeGreaterThan(0);
			const count = await page.evaluate(() => (window as unknown as { __loopledgerBench: { drawn: number } }).__loopledgerBench.drawn);
			await kp.fill(String(Number((kpBefore * 1.6).toPrecision(4))));
			await kp.press('Enter');
			await drawn(page, count);
			await settled(page);
			await expect.poll(() => text(overshoot)).not.toBe(before);
			const after = await text(overshoot);
			expect(Number.parseFloat(after)).toBeGreaterThan(Number.parseFloat(before));
			expect(after).not.toMatch(/NaN|Infinity/);
			expect((await stepChart(page).screenshot()).equals(picture)).toBe(false);

			// The slider moves the same setting.
			const slider = bench(page).getByRole('slider', { name: 'Gain Kp' });
			const value = Number(await slider.inputValue());
			await slider.focus();
			await page.keyboard.press('ArrowLeft');
			await expect.poll(async () => Number(await slider.inputValue())).toBe(value - 1);
			await expect.poll(async () => Number((await kp.inputValue()).trim())).toBeLessThan(kpBefore * 1.6);
		} finally {
			await context.close();
		}
	});

	it('loads a tuning rule into the controller settings', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await openModel(page);
			const rules = bench(page).getByRole('table', { name: /^Tuning rules for a PI controller/ });
			const row = rules.getByRole('row', { name: /Ziegler–Nichols reaction curve/ });
			const ruleKp = (await row.getByRole('cell').first().innerText()).trim();
			await row.getByRole('button', { name: 'Load Ziegler–Nichols reaction curve' }).click();
			await shown(bench(page).getByText(/Ziegler–Nichols reaction curve loaded into the bench/));
			const kp = bench(page).getByRole('textbox', { name: 'Gain Kp' });
			await expect.poll(async () => Number((await kp.inputValue()).trim())).toBeCloseTo(Number(ruleKp), 3);
			await shown(bench(page).getByText(/^From Ziegler–Nichols reaction curve/));
		} finally {
			await context.close();
		}
	});

	it('says so next to the form when the series form cannot represent the setting, and flags an unstable loop', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await openModel(page);
			const b = bench(page);
			await b.getByRole('radio', { name: 'PID' }).check({ force: true });
			const ti = b.getByRole('textbox', { name: 'Integral time Ti' });
			const td = b.getByRole('textbox', { name: 'Derivative time Td' });
			await ti.fill('1');
			await ti.press('Enter');
			await td.fill('1');
			await td.press('Enter');
			const form = b.getByLabel('Controller form');
			await form.selectOption('series');
			const note = b.getByRole('alert').filter({ hasText: /Not converted/ });
			await shown(note);
			expect(await text(note)).toContain('Ti ≥ 4·Td');
			expect(await form.inputValue()).toBe('ideal');

			const kp = b.getByRole('textbox', { name: 'Gain Kp' });
			await kp.fill('500');
			await kp.press('Enter');
			await shown(b.getByRole('alert').filter({ hasText: 'Unstable closed loop' }));
			await expect.poll(() => text(metric(setpointTable(page), /^Overshoot/))).toBe('—');
			expect(await b.innerText()).not.toMatch(/NaN|Infinity/);
		} finally {
			await context.close();
		}
	});

	it('draws the robustness band and reports the spread', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await openModel(page);
			const b = bench(page);
			await b.getByLabel('Show the robustness band on the set-point plot').check();
			const spread = b.getByRole('status').filter({ hasText: /\d+ cases/ });
			await shown(spread, 30_000);
			await expect.poll(() => text(b.getByRole('figure', { name: /^Set-point step/ }))).toContain('PV envelope, max');
			expect(await text(spread)).toMatch(/Overshoot[\s\S]*Gain margin/);
		} finally {
			await context.close();
		}
	});

	it('saves the settings as a draft tuning set for a loop tag (engineer) and lists it', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await openModel(page);
			await settled(page);
			const tag = `TIC-B${String(Date.now()).slice(-6)}`;
			const b = bench(page);
			await b.getByLabel('Loop tag').fill(tag);
			await b.getByLabel('Notes (optional)').fill('Tried on the bench; check at the next bake.');
			const save = b.getByRole('button', { name: 'Save draft tuning set' });
			await expect.poll(() => save.isEnabled()).toBe(true);
			await save.click();
			await shown(b.getByRole('status').filter({ hasText: `for loop ${tag}` }), 30_000);
			const sets = page.getByRole('region', { name: 'Tuning sets' });
			const row = sets.getByRole('row', { name: new RegExp(tag) });
			await shown(row);
			expect(await text(row)).toMatch(/draft/i);

			// An invalid loop tag is refused next to the field and nothing is saved.
			await b.getByLabel('Loop tag').fill('bad tag!');
			await save.click();
			await shown(b.getByText(/Loop tag: 1–40 letters/));
			expect(await sets.getByRole('row', { name: /BAD TAG/ }).count()).toBe(0);
		} finally {
			await context.close();
		}
	});

	it('refuses a save from a viewer and one computed on another revision, on the server', async () => {
		const post = async (page: Page, fields: Record<string, string>) => {
			const res = await page.request.post(`${page.url()}?/saveTuningSet`, {
				form: fields,
				headers: { origin: BASE, accept: 'application/json', 'x-sveltekit-action': 'true' }
			});
			return (await res.json()) as { type: string; status?: number };
		};
		const fields = { loopTag: 'TIC-REFUSED', controllerType: 'PI', form: 'ideal', timeUnit: 's', kp: '1', ti: '60' };
		const viewer = await signedIn('viewer');
		try {
			await openModel(viewer.page, MODEL_TITLE, false);
			const asViewer = await post(viewer.page, { ...fields, revisionId: await currentRevisionId(viewer.page) });
			expect(asViewer).toMatchObject({ type: 'failure', status: 403 });
		} finally {
			await viewer.context.close();
		}
		const engineer = await signedIn('engineer');
		try {
			await openModel(engineer.page);
			const stale = await post(engineer.page, { ...fields, revisionId: '999999' });
			expect(stale).toMatchObject({ type: 'failure', status: 409 });
			await engineer.page.reload({ waitUntil: 'networkidle' });
			expect(await engineer.page.getByRole('region', { name: 'Tuning sets' }).getByRole('row', { name: /TIC-REFUSED/ }).count()).toBe(0);
		} finally {
			await engineer.context.close();
		}
	});

	it('shows a viewer the bench without the save form', async () => {
		const { context, page } = await signedIn('viewer');
		try {
			await openModel(page);
			await shown(bench(page).getByRole('slider', { name: 'Gain Kp' }));
			await shown(bench(page).getByRole('heading', { name: 'Predictions, not the plant' }));
			expect(await bench(page).getByRole('heading', { name: 'Save as a tuning set draft' }).count()).toBe(0);
			expect(await bench(page).getByRole('button', { name: 'Save draft tuning set' }).count()).toBe(0);
		} finally {
			await context.close();
		}
	});

	it("gives each metric's meaning on focus and links to its definition", async () => {
		const { context, page } = await signedIn('viewer');
		try {
			await openModel(page);
			const link = setpointTable(page).getByRole('link', { name: 'Overshoot' });
			await link.focus();
			const tip = bench(page).getByRole('tooltip').filter({ hasText: 'How far the PV passes its final value' });
			await shown(tip);
			await link.click();
			await page.waitForURL((u) => u.pathname === '/guide/step-response');
			await shown(page.getByRole('heading', { level: 1, name: 'Set-point step response' }));
			await shown(page.getByRole('heading', { level: 2, name: 'Overshoot' }));
		} finally {
			await context.close();
		}
	});

	it('reads without JavaScript and says the bench needs it', async () => {
		const { context, page } = await signedIn('viewer', { javaScriptEnabled: false });
		try {
			await openModel(page, MODEL_TITLE, false);
			expect(await text(bench(page))).toContain('The bench computes in your browser and needs JavaScript');
			await shown(page.getByRole('region', { name: 'Transfer function' }));
		} finally {
			await context.close();
		}
	});

	it('takes screenshots of the model page with the bench in light and dark themes', async () => {
		for (const theme of ['light', 'dark'] as const) {
			const { context, page } = await signedIn('engineer', { theme });
			try {
				await openModel(page);
				await settled(page);
				await bench(page).getByRole('button', { name: 'Pin current settings' }).click();
				const kp = bench(page).getByRole('textbox', { name: 'Gain Kp' });
				const v = Number((await kp.inputValue()).trim());
				await kp.fill(String(Number((v * 1.4).toPrecision(4))));
				await kp.press('Enter');
				await settled(page);
				await page.waitForTimeout(400);
				await page.screenshot({ path: `${SHOTS}/bench-model-${theme}.png`, fullPage: true });
				await bench(page).screenshot({ path: `${SHOTS}/bench-${theme}.png` });
				expect((await bench(page).innerText()).length).toBeGreaterThan(500);
			} finally {
				await context.close();
			}
		}
	});
});
