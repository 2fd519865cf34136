/**
 * The review journey in Debian's Chromium against the running server (BASE_URL; `npm test` starts
 * it with the demo data, the mail worker and the local mail catcher). An engineer's new draft of an
 * approved demo model (written through the revision service, as the edit form would) is submitted
 * from its revision page; one reviewer sends it back with a comment; the engineer edits it and
 * submits it again; a second reviewer approves it (the large change needs a comment, and the
 * service's reason is shown); a reviewer whose page was stale gets a clear "nothing was changed"
 * message. The register and the viewer's model page keep the approved data until then and show the
 * new revision after; the history shows both revisions and their comparison; the administrator
 * reads the author's notifications on the caught-mail page and finds the journey in the audit log
 * and its CSV export. Selectors are roles and labels only. Screenshots: the queue, the model page
 * with its "newer revision in review" banner, the comparison.
 */
import { mkdirSync } from 'node:fs';
import { chromium, type Browser, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_USERS } from '../../src/lib/server/seed/demo-users';
import { approve, createModel, createRevision, getRevision, revisionTemplate, submitForReview, updateDraft } from '../../src/lib/server/revisions';
import { formatSig } from '../../src/lib/format';
import type { RevisionInput } from '../../src/lib/schemas/revision';
import { actingByEmail, closeServices, quietApprovedModel } from '../helpers/review';

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
const [reviewerOne, reviewerTwo] = DEMO_USERS.filter((u) => u.role === 'reviewer');
const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!;
const admin = DEMO_USERS.find((u) => u.role === 'admin')!;

let browser: Browser;
const contexts: BrowserContext[] = [];
let modelId: number;
let approvedRevisionId: number;
let revisionId: number;
let revisionNo: number;
let approvedNo: number;
let tag: string;
let approvedValues: RevisionInput;
const GAIN_FACTOR = 1.3;
/** Makes this run's texts unique, so a second run on the same database still sees them change. */
const RUN = Date.now().toString(36);

async function signedIn(email: string, javaScriptEnabled = true): Promise<Page> {
	const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1440, height: 900 }, javaScriptEnabled });
	contexts.push(context);
	const page = await context.newPage();
	await page.goto('/signin', { waitUntil: 'networkidle' });
	await page.getByLabel('Email').fill(email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL((u) => u.pathname === '/register');
	await page.waitForLoadState('networkidle');
	return page;
}

const revisionPath = () => `/models/${modelId}/revisions/${revisionId}`;

/** Waits until an element of `locator` shows `text` (substring or pattern) and returns that element's text. */
async function shows(locator: Locator, text: string | RegExp, timeout = 20_000): Promise<string> {
	const hit = locator.filter({ hasText: text }).first();
	await hit.waitFor({ state: 'visible', timeout });
	return hit.innerText();
}

/** Waits until `locator` is visible. */
async function visible(locator: Locator, timeout = 20_000): Promise<void> {
	await locator.first().waitFor({ state: 'visible', timeout });
}

beforeAll(async () => {
	mkdirSync(SHOTS, { recursive: true });
	browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
	// A new draft of an approved FOPDT model, by the engineer, through the revision service.
	const author = await actingByEmail(engineer.email);
	const quiet = await quietApprovedModel(['fopdt']);
	modelId = quiet.modelId;
	approvedRevisionId = quiet.approvedRevisionId;
	const template = await revisionTemplate(author, modelId);
	approvedValues = template.values;
	tag = template.model.asset.tag;
	const draft = await createRevision(author, modelId, {
		...approvedValues,
		k: Number(((approvedValues.k ?? 1) * GAIN_FACTOR).toPrecision(6)),
		changeSummary: `New bump test after the valve trim was replaced (test ${RUN}): the gain is up about 30 %.`
	});
	revisionId = draft.revision.id;
	revisionNo = draft.revision.no;
	approvedNo = (await getRevision(author, approvedRevisionId)).revision.no;
}, 60_000);

afterAll(async () => {
	for (const c of contexts) await c.close().catch(() => {});
	await browser?.close();
	await closeServices();
});

describe('review journey', () => {
	let engineerPage: Page;
	let reviewerOnePage: Page;
	let reviewerTwoPage: Page;

	it('the engineer opens the new revision from the model page banner and submits it', async () => {
		engineerPage = await signedIn(engineer.email);
		await engineerPage.goto(`/models/${modelId}`, { waitUntil: 'networkidle' });
		expect(await engineerPage.getByRole('navigation', { name: 'Revision shown' }).getByRole('link', { name: /Approved · rev/ }).getAttribute('aria-current')).toBe('page');
		await engineerPage.getByRole('link', { name: `Open revision ${revisionNo} to review or act on it` }).click();
		await engineerPage.waitForURL((u) => u.pathname === revisionPath());
		await engineerPage.getByRole('button', { name: 'Submit for review' }).click();
		await shows(engineerPage.getByRole('status'), `Revision ${revisionNo} is submitted for review`);
		await shows(engineerPage.getByRole('note'), 'Waiting for review');
		// The author may not review it, and is told nothing to approve.
		expect(await engineerPage.getByRole('button', { name: /Approve revision/ }).count()).toBe(0);
	});

	it('readers still see the approved revision; the model page says a newer one is in review', async () => {
		await engineerPage.goto(`/models/${modelId}`, { waitUntil: 'networkidle' });
		const banner = engineerPage.getByRole('note').filter({ hasText: 'A newer revision is in review' });
		expect(await shows(banner, `revision ${revisionNo}`)).toContain('until a reviewer approves the new one');
		await engineerPage.screenshot({ path: `${SHOTS}/review-model-banner.png`, fullPage: false });
		// Switch to the revision in review and back (plain links, ?revision=).
		await engineerPage.getByRole('link', { name: new RegExp(`Rev ${revisionNo} · in review`) }).click();
		await engineerPage.waitForURL((u) => u.searchParams.get('revision') === String(revisionId));
		await visible(engineerPage.getByRole('note').filter({ hasText: `You are looking at revision ${revisionNo}` }));

		const viewerPage = await signedIn(viewer.email);
		await viewerPage.goto(`/register?q=${encodeURIComponent(tag)}`, { waitUntil: 'networkidle' });
		const row = viewerPage.getByRole('table', { name: /^Plant models/ }).getByRole('row').filter({ hasText: tag }).first();
		const rowText = await shows(row, tag);
		expect(rowText).toContain(formatSig(approvedValues.k, 3));
		expect(rowText).not.toContain(formatSig(Number(((approvedValues.k ?? 1) * GAIN_FACTOR).toPrecision(6)), 3));
		await viewerPage.goto(`/models/${modelId}`, { waitUntil: 'networkidle' });
		expect(await viewerPage.getByRole('navigation', { name: 'Revision shown' }).count()).toBe(0);
		const draftAsViewer = await viewerPage.goto(`/models/${modelId}?revision=${revisionId}`);
		expect(draftAsViewer?.status()).toBe(404);
	});

	it('the first reviewer finds it in the queue and sends it back with a comment', async () => {
		reviewerOnePage = await signedIn(reviewerOne.email);
		expect(await reviewerOnePage.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: /Review/ }).innerText()).toMatch(/Review\s*\d+/);
		await reviewerOnePage.goto('/review', { waitUntil: 'networkidle' });
		const row = reviewerOnePage.getByRole('row').filter({ hasText: `${tag}` }).filter({ hasText: `rev ${revisionNo}` });
		const queueRow = await shows(row, 'You may review');
		expect(queueRow).toContain('K +30 %');
		expect(queueRow).toContain('large: comment needed');
		expect(queueRow).toContain(engineer.name);
		await reviewerOnePage.screenshot({ path: `${SHOTS}/review-queue.png`, fullPage: true });
		await row.getByRole('link').first().click();
		await reviewerOnePage.waitForURL((u) => u.pathname === revisionPath());
		await reviewerOnePage.getByLabel(/What needs to change/).fill('The dead time looks longer on the trend: check it against the step-test file.');
		await reviewerOnePage.getByRole('button', { name: 'Send back for changes' }).click();
		await shows(reviewerOnePage.getByRole('status'), `Revision ${revisionNo} is sent back to ${engineer.name}`);
	});

	it('the engineer sees the request, edits the draft and submits it again', async () => {
		await engineerPage.goto(revisionPath(), { waitUntil: 'networkidle' });
		await visible(engineerPage.getByRole('note').filter({ hasText: `Sent back for changes by ${reviewerOne.name}` }));
		await visible(engineerPage.getByText('The dead time looks longer on the trend'));
		const author = await actingByEmail(engineer.email);
		const view = await getRevision(author, revisionId);
		await updateDraft(author, revisionId, view.revision.version, {
			...view.formValues,
			theta: (approvedValues.theta ?? 0) + (approvedValues.timeUnit === 'min' ? 0.05 : 3),
			changeSummary: `New bump test after the valve trim was replaced (test ${RUN}): the gain is up about 30 %; dead time re-read from the trend.`
		});
		await engineerPage.reload({ waitUntil: 'networkidle' });
		await engineerPage.getByRole('button', { name: 'Submit for review' }).click();
		await shows(engineerPage.getByRole('status'), 'submitted for review');
	});

	it('the second reviewer approves; the large change needs a comment and the service says why', async () => {
		// The first reviewer's page is now stale (loaded before the second reviewer acts).
		await reviewerOnePage.goto(revisionPath(), { waitUntil: 'networkidle' });
		reviewerTwoPage = await signedIn(reviewerTwo.email);
		await reviewerTwoPage.goto(revisionPath(), { waitUntil: 'networkidle' });
		expect(await shows(reviewerTwoPage.getByRole('note'), 'Large change: approval needs a review comment.')).toContain('gain K changed by +30 %');
		const comment = reviewerTwoPage.getByLabel(/Review comment/);
		// Without the browser's own check, the server refuses and names the reason next to the field.
		await comment.evaluate((el) => el.removeAttribute('required'));
		await reviewerTwoPage.getByRole('button', { name: `Approve revision ${revisionNo}` }).click();
		await visible(reviewerTwoPage.getByText(/A review comment is required for a large change: gain K changed by \+30 %/));
		expect(await comment.getAttribute('aria-invalid')).toBe('true');
		await comment.fill('Gain change confirmed against the new bump test; dead time checked.');
		await reviewerTwoPage.getByRole('button', { name: `Approve revision ${revisionNo}` }).click();
		await shows(reviewerTwoPage.getByRole('status'), `Revision ${revisionNo} is approved`);
		await visible(reviewerTwoPage.getByRole('note').filter({ hasText: 'This is the approved revision' }));
	});

	it('a reviewer acting on a stale page is told nothing was changed', async () => {
		await reviewerOnePage.getByLabel(/What needs to change/).fill('One more question about the valve trim.');
		await reviewerOnePage.getByRole('button', { name: 'Send back for changes' }).click();
		expect(await shows(reviewerOnePage.getByRole('alert'), 'Nothing was changed.')).toContain('this one is approved');
		// The page reloaded what is stored: the revision is approved, no review form is offered.
		await visible(reviewerOnePage.getByRole('note').filter({ hasText: 'This is the approved revision' }));
		expect(await reviewerOnePage.getByRole('button', { name: 'Send back for changes' }).count()).toBe(0);
	});

	it('the model page and the register show the new approved revision to a viewer', async () => {
		const viewerPage = await signedIn(viewer.email);
		await viewerPage.goto(`/models/${modelId}`, { waitUntil: 'networkidle' });
		await visible(viewerPage.getByText(`revision ${revisionNo}`, { exact: true }));
		expect(await viewerPage.getByRole('note').filter({ hasText: 'newer revision' }).count()).toBe(0);
		await viewerPage.goto(`/register?q=${encodeURIComponent(tag)}`, { waitUntil: 'networkidle' });
		const row = viewerPage.getByRole('table', { name: /^Plant models/ }).getByRole('row').filter({ hasText: tag }).first();
		expect(await shows(row, tag)).toContain(formatSig(Number(((approvedValues.k ?? 1) * GAIN_FACTOR).toPrecision(6)), 3));
	});

	it('the history lists both revisions and compares them', async () => {
		await reviewerTwoPage.goto(`/models/${modelId}/history`, { waitUntil: 'networkidle' });
		const table = reviewerTwoPage.getByRole('table', { name: /^Revisions of/ });
		await visible(table.getByRole('link', { name: `Revision ${revisionNo}` }));
		const oldRow = table.getByRole('row').filter({ has: reviewerTwoPage.getByRole('link', { name: `Revision ${approvedNo}`, exact: true }) });
		expect(await shows(oldRow, 'Superseded')).toBeTruthy();
		const newRow = table.getByRole('row').filter({ has: reviewerTwoPage.getByRole('link', { name: `Revision ${revisionNo}`, exact: true }) });
		const newText = await shows(newRow, 'Approved');
		expect(newText).toContain(engineer.name);
		expect(newText).toContain(reviewerTwo.name);
		expect(newText).toContain('Gain change confirmed');
		// The default comparison: the revision it started from → the new one.
		expect(await reviewerTwoPage.getByLabel('Older revision').inputValue()).toBe(String(approvedRevisionId));
		expect(await reviewerTwoPage.getByLabel('Newer revision').inputValue()).toBe(String(revisionId));
		const params = reviewerTwoPage.getByRole('table', { name: /^Parameters of revision/ });
		expect(await shows(params.getByRole('row'), 'Gain K')).toContain('+30 %');
		expect(await shows(params.getByRole('row'), 'Dead time θ')).not.toContain('unchanged');
		const texts = reviewerTwoPage.getByRole('region', { name: 'Texts' });
		expect((await shows(texts, RUN)).toLowerCase()).toContain('change summary');
		await visible(texts.getByRole('insertion').filter({ hasText: RUN }));
		await visible(reviewerTwoPage.getByRole('img', { name: /Open-loop step responses/ }));
		await reviewerTwoPage.getByRole('heading', { name: /Revision \d+ → revision \d+/ }).scrollIntoViewIfNeeded();
		await reviewerTwoPage.screenshot({ path: `${SHOTS}/review-diff.png`, fullPage: true });
	});

	it('the administrator reads the author’s notifications among the caught mail', async () => {
		const adminPage = await signedIn(admin.email);
		// This run's revision number keeps mail of an earlier run on the same database out.
		const wanted = [`Changes requested: ${tag}`, `Approved: ${tag}`].map((w) => [w, `(rev. ${revisionNo})`]);
		let found = false;
		for (let i = 0; i < 30 && !found; i++) {
			await adminPage.goto(`/admin/mail?q=${encodeURIComponent(tag)}`, { waitUntil: 'networkidle' });
			const rows = adminPage.getByRole('table', { name: 'Caught messages, newest first' }).getByRole('row').filter({ hasText: engineer.email });
			const texts = await rows.allInnerTexts();
			found = wanted.every((parts) => texts.some((t) => parts.every((p) => t.includes(p))));
			if (!found) await adminPage.waitForTimeout(2000);
		}
		expect(found, 'the mail worker delivered both notifications to the catcher').toBe(true);
		await adminPage.getByRole('link', { name: `Approved: ${tag}`, exact: false }).filter({ hasText: `(rev. ${revisionNo})` }).first().click();
		await shows(adminPage.getByRole('heading', { level: 1 }), `Approved: ${tag}`);
		const body = await shows(adminPage.getByRole('region', { name: 'Plain-text body' }), reviewerTwo.name);
		expect(body).toContain('Gain change confirmed');

		// The audit log holds every step of the journey, and the CSV export has the same rows.
		await adminPage.goto(`/admin/audit?entityType=model_revision&entityId=${revisionId}`, { waitUntil: 'networkidle' });
		const audit = adminPage.getByRole('table', { name: /^Audit events/ });
		for (const action of ['revision.create', 'revision.submit', 'revision.request_changes', 'revision.update', 'revision.approve']) {
			await visible(audit.getByRole('row').filter({ hasText: action }));
		}
		const href = await adminPage.getByRole('link', { name: /Download CSV/ }).getAttribute('href');
		const csv = await adminPage.request.get(href!);
		expect(csv.status()).toBe(200);
		expect(csv.headers()['content-type']).toMatch(/text\/csv/);
		const text = await csv.text();
		expect(text.split('\r\n')[0]).toBe('\uFEFFid,at_utc,actor_id,actor_email,action,entity_type,entity_id,ip,before_json,after_json');
		expect(text.split('\r\n').filter((l) => l.includes(',revision.submit,model_revision,')).length).toBe(2);
	});

	it('a reviewer revalidates an unchanged model with a new date; an administrator withdraws it with a reason', async () => {
		// A model of its own (on the journey's asset), approved through the services, so no demo model is retired.
		const author = await actingByEmail(engineer.email);
		const template = await revisionTemplate(author, modelId);
		const created = await createModel(author, {
			title: 'Proofer 1 air temperature, spare coil (retired in test)',
			asset: { id: template.model.asset.id },
			revision: { ...template.values, changeSummary: 'Spare steam coil, same bump test procedure.' }
		});
		await submitForReview(author, created.revision.id);
		await approve(await actingByEmail(reviewerTwo.email), created.revision.id, { comment: 'Checked.' });

		await reviewerOnePage.goto(`/models/${created.model.id}/revisions/${created.revision.id}`, { waitUntil: 'networkidle' });
		await reviewerOnePage.getByLabel('New revalidate-by date').fill('2030-06-30');
		await reviewerOnePage.getByRole('button', { name: 'Revalidate' }).click();
		expect(await shows(reviewerOnePage.getByRole('status'), 'Revalidated:')).toContain('revalidate-by 2030-06-30');

		const adminPage = await signedIn(admin.email);
		await adminPage.goto(`/models/${created.model.id}`, { waitUntil: 'networkidle' });
		await adminPage.getByRole('link', { name: /record and review actions/ }).click();
		await adminPage.waitForURL((u) => u.pathname.startsWith(`/models/${created.model.id}/revisions/`));
		expect(await adminPage.getByRole('button', { name: /Approve/ }).count()).toBe(0);
		// The reason is required: the browser's own check first, then the server's message if bypassed.
		const reason = adminPage.getByLabel(/^Reason/);
		await reason.evaluate((el) => el.removeAttribute('required'));
		await adminPage.getByRole('button', { name: 'Withdraw the model' }).click();
		await visible(adminPage.getByText('Reason: enter a value.'));
		await reason.fill('Spare coil removed from the proofer; the model no longer applies.');
		await adminPage.getByRole('button', { name: 'Withdraw the model' }).click();
		await shows(adminPage.getByRole('status'), 'is withdrawn');
		await adminPage.goto(`/models/${created.model.id}`, { waitUntil: 'networkidle' });
		await visible(adminPage.getByText('Spare coil removed from the proofer', { exact: false }));
	});

	it('reads without JavaScript: the revision page and the history', async () => {
		const page = await signedIn(reviewerOne.email, false);
		const res = await page.goto(revisionPath());
		expect(res?.status()).toBe(200);
		await visible(page.getByRole('heading', { name: `Revision ${revisionNo} of`, exact: false }));
		await visible(page.getByRole('region', { name: 'Review actions' }));
		await page.goto(`/models/${modelId}/history`);
		await visible(page.getByRole('table', { name: /^Parameters of revision/ }));
		await visible(page.getByText('Values of both responses'));
	});
});
