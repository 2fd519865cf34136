/**
 * Browser benchmark of the bench (run: BASE_URL=http://127.0.0.1:3000 npx tsx scripts/bench-browser.ts).
 *
 * Starts from a running server, signs in as the demo viewer in headless Chromium (Debian's
 * /usr/bin/chromium through playwright-core), opens the model page of a 4th-order model with dead
 * time, and drives the Kp slider twice: dragged with the mouse (pointer moves of one pixel, as a
 * person drags; the browser delivers them at the start of a frame) and stepped with the arrow
 * keys (discrete key events, which arrive at any point of a frame). Each move or key press is one
 * `input` event. The page measures every input-to-redraw time itself (`window.__loopledgerBench`):
 * performance.now() at the input event → `analyze()` (in the worker, or inline while it stays
 * fast) → `setData` on every chart → the next animation frame. Prints the median and 95th
 * percentile of each, with the analysis and drawing parts.
 *
 * Options: --presses N (inputs per mode, default 200, after 20 warm-up inputs), --model ID
 * (default: the first approved model whose denominator is of order ≥ 4 with dead time; when the
 * data has none, the highest-order model with dead time, and the script says so), --json (one
 * JSON line only). Target (issue 4): median under 16 ms.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium, type Page } from 'playwright-core';
import { DEMO_PASSWORD, DEMO_USERS } from '../src/lib/server/seed/demo-users';

interface Sample {
	totalMs: number;
	computeMs: number;
	startMs: number;
	arriveMs: number;
	drawMs: number;
	inline: boolean;
}
interface Probe {
	samples: Sample[];
	drawn: number;
	ready: boolean;
	offMainThread: boolean;
	clear(): void;
}
declare global {
	interface Window {
		__loopledgerBench?: Probe;
	}
}

const args = process.argv.slice(2);
const option = (name: string): string | null => {
	const i = args.indexOf(`--${name}`);
	return i >= 0 && i + 1 < args.length ? args[i + 1] : null;
};
const PRESSES = Number(option('presses') ?? 200);
const WARMUP = 20;
const JSON_ONLY = args.includes('--json');
const BASE = (process.env.BASE_URL ?? '').replace(/\/$/, '');
const TARGET_MS = 16;

const log = (line: string) => {
	if (!JSON_ONLY) console.log(line);
};

function percentile(sorted: number[], p: number): number {
	if (sorted.length === 0) return Number.NaN;
	const k = (sorted.length - 1) * p;
	const lo = Math.floor(k);
	const hi = Math.ceil(k);
	return sorted[lo] + (sorted[hi] - sorted[lo]) * (k - lo);
}

async function signIn(page: Page) {
	const viewer = DEMO_USERS.find((u) => u.role === 'viewer');
	if (!viewer) throw new Error('The demo data has no viewer.');
	await page.goto('/signin', { waitUntil: 'networkidle' });
	await page.getByLabel('Email').fill(viewer.email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL((u) => !u.pathname.startsWith('/signin'), { timeout: 30_000, waitUntil: 'commit' });
	return viewer;
}

interface Candidate {
	id: number;
	title: string;
	order: number;
	delay: number;
}

/** The model to measure: --model, else the first of order ≥ 4 with dead time, else the highest order with dead time. */
async function chooseModel(page: Page): Promise<{ model: Candidate; fourthOrder: boolean }> {
	const ids: number[] = [];
	const forced = option('model');
	if (forced) ids.push(Number(forced));
	else {
		for (let p = 1; p <= 40; p++) {
			const res = await page.request.get(`/api/v1/models?page=${p}`);
			if (!res.ok()) throw new Error(`GET /api/v1/models failed: ${res.status()} ${await res.text()}`);
			const body = (await res.json()) as { models: { id: number }[]; pageCount: number };
			ids.push(...body.models.map((m) => m.id));
			if (p >= body.pageCount) break;
		}
	}
	const found: Candidate[] = [];
	for (const id of ids) {
		const res = await page.request.get(`/api/v1/models/${id}`);
		if (!res.ok()) continue;
		const doc = (await res.json()) as { model: { id: number; title: string }; revision: { transferFunction: { den: number[]; delaySeconds: number } } };
		let den = doc.revision.transferFunction.den;
		while (den.length > 1 && den[0] === 0) den = den.slice(1);
		found.push({ id: doc.model.id, title: doc.model.title, order: den.length - 1, delay: doc.revision.transferFunction.delaySeconds });
	}
	if (found.length === 0) throw new Error('No model is visible to the demo viewer.');
	if (forced) return { model: found[0], fourthOrder: found[0].order >= 4 && found[0].delay > 0 };
	const fourth = found.find((m) => m.order >= 4 && m.delay > 0);
	if (fourth) return { model: fourth, fourthOrder: true };
	const delayed = found.filter((m) => m.delay > 0).sort((a, b) => b.order - a.order);
	return { model: delayed[0] ?? found[0], fourthOrder: false };
}

async function main(): Promise<number> {
	if (!BASE) {
		console.error('Set BASE_URL to a running Loopledger server with the demo data (e.g. BASE_URL=http://127.0.0.1:3000).');
		return 2;
	}
	const profile = mkdtempSync(path.join(tmpdir(), 'loopledger-bench-'));
	// STACK.md trap 16: Debian's Chromium, these flags, a fresh profile.
	const context = await chromium.launchPersistentContext(profile, {
		executablePath: '/usr/bin/chromium',
		headless: true,
		args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
		baseURL: BASE,
		viewport: { width: 1440, height: 900 }
	});
	try {
		const page = context.pages()[0] ?? (await context.newPage());
		const viewer = await signIn(page);
		const { model, fourthOrder } = await chooseModel(page);
		log(`signed in as ${viewer.email} (viewer)`);
		log(`model #${model.id} "${model.title}": order ${model.order}, dead time ${model.delay} s`);
		if (!fourthOrder)
			log(
				option('model')
					? `NOTE: model #${model.id} is not of order ≥ 4 with dead time.`
					: 'NOTE: no approved model of order ≥ 4 with dead time is visible; measured on the highest-order model with dead time instead.'
			);

		await page.goto(`/models/${model.id}`, { waitUntil: 'networkidle' });
		await page.waitForFunction(() => window.__loopledgerBench?.ready === true, null, { timeout: 30_000 });
		const slider = page.getByRole('slider', { name: 'Gain Kp' });
		await slider.focus();

		const drawnCount = () => page.evaluate(() => window.__loopledgerBench!.drawn);
		const afterDraw = (before: number) => page.waitForFunction((b) => window.__loopledgerBench!.drawn > b, before, { polling: 'raf', timeout: 10_000 });

		// Mode 1: drag the slider's thumb with the mouse, one pixel per move, 30 px each way.
		const box = await slider.boundingBox();
		if (!box) throw new Error('The Kp slider is not visible.');
		const y = box.y + box.height / 2;
		const x0 = box.x + (box.width * Number(await slider.inputValue())) / 1000;
		await page.mouse.move(x0, y);
		await page.mouse.down();
		let x = x0;
		const drag = async (i: number) => {
			const before = await drawnCount();
			x += Math.floor(i / 30) % 2 === 0 ? 1 : -1;
			await page.mouse.move(x, y);
			await afterDraw(before);
		};
		for (let i = 0; i < WARMUP; i++) await drag(i);
		await page.evaluate(() => window.__loopledgerBench!.clear());
		for (let i = 0; i < PRESSES; i++) await drag(i);
		await page.mouse.up();
		const dragged = await page.evaluate(() => window.__loopledgerBench!.samples.slice());

		// Mode 2: arrow keys, 20 steps up, 20 down.
		await slider.focus();
		const press = async (i: number) => {
			const before = await drawnCount();
			await page.keyboard.press(Math.floor(i / 20) % 2 === 0 ? 'ArrowRight' : 'ArrowLeft');
			await afterDraw(before);
		};
		for (let i = 0; i < WARMUP; i++) await press(i);
		await page.evaluate(() => window.__loopledgerBench!.clear());
		for (let i = 0; i < PRESSES; i++) await press(i);
		const keyed = await page.evaluate(() => window.__loopledgerBench!.samples.slice());
		const offMainThread = await page.evaluate(() => window.__loopledgerBench!.offMainThread);

		const summary = (samples: Sample[]) => {
			const sorted = (f: (s: Sample) => number) => samples.map(f).sort((a, b) => a - b);
			const total = sorted((s) => s.totalMs);
			return {
				samples: samples.length,
				inlineShare: samples.filter((s) => s.inline).length / Math.max(1, samples.length),
				medianMs: percentile(total, 0.5),
				p95Ms: percentile(total, 0.95),
				startMedianMs: percentile(sorted((s) => s.startMs), 0.5),
				computeMedianMs: percentile(sorted((s) => s.computeMs), 0.5),
				arriveMedianMs: percentile(sorted((s) => s.arriveMs), 0.5),
				drawMedianMs: percentile(sorted((s) => s.drawMs), 0.5)
			};
		};
		const result = {
			model: model.id,
			order: model.order,
			delaySeconds: model.delay,
			fourthOrderWithDelay: fourthOrder,
			offMainThread,
			drag: summary(dragged),
			keys: summary(keyed),
			targetMs: TARGET_MS
		};
		if (JSON_ONLY) console.log(JSON.stringify(result));
		else {
			const f = (v: number) => v.toFixed(2);
			for (const [name, r] of [
				['mouse drag', result.drag],
				['arrow keys', result.keys]
			] as const) {
				log(`${name}: ${r.samples} inputs after ${WARMUP} warm-up inputs; analyze() inline on the main thread for ${Math.round(100 * r.inlineShare)} %, ${offMainThread ? 'in the web worker for the rest' : 'no worker'}`);
				log(`  input → redrawn plots: median ${f(r.medianMs)} ms, p95 ${f(r.p95Ms)} ms (target: median < ${TARGET_MS} ms) — ${r.medianMs < TARGET_MS ? 'within the target' : 'ABOVE the target'}`);
				log(`  analyze() starts ${f(r.startMedianMs)} ms after the input and takes ${f(r.computeMedianMs)} ms; the result is on the page after ${f(r.arriveMedianMs)} ms; state update and setData ${f(r.drawMedianMs)} ms; then the wait for the next frame`);
			}
		}
		return 0;
	} finally {
		await context.close();
		rmSync(profile, { recursive: true, force: true });
	}
}

main().then(
	(code) => process.exit(code),
	(e) => {
		console.error(e instanceof Error ? e.message : e);
		process.exit(1);
	}
);
