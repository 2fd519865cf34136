/**
 * E-mail end to end against a real MariaDB and the embedded SMTP catcher on a free port: the
 * notifications of the workflow (recipients, subject, plain-text and HTML bodies, escaping, link),
 * the worker's retries while the SMTP server is down (the outbox keeps the mail, attempts and
 * error recorded, exponential back-off) and exactly one delivery once it is back, safe claiming by
 * concurrent workers, permanent refusals, the weekly digest (opt-out, idempotent per ISO week),
 * and the administrators' reading of caught mail.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createServer } from 'node:net';
import { QueryTypes } from 'sequelize';
import reference from '../fixtures/workflow/workflow-reference.json';
import { sequelize } from '../../src/lib/server/db/connection';
import { PlantModel, initModels } from '../../src/lib/server/db/models';
import { CaughtMail, MailOutbox } from '../../src/lib/server/db/models-workflow';
import { approve, createModel, requestChanges, submitForReview } from '../../src/lib/server/revisions';
import { getCaughtMail, listCaughtMail, startMailCatcher, type MailCatcher } from '../../src/lib/server/mail/catcher';
import { backoffSeconds, deliverPending, listOutbox, retryFailedMail, startMailWorker } from '../../src/lib/server/mail/worker';
import { createMailTransport, type MailTransport } from '../../src/lib/server/mail/transport';
import { DIGEST_HORIZON_DAYS, isoWeek, queueRevalidationDigest } from '../../src/lib/server/mail/outbox';
import { escapeHtml } from '../../src/lib/server/mail/templates';
import { PermissionDenied } from '../../src/lib/auth/roles';
import { resetEnvCache } from '../../src/lib/server/env';
import { closeTestDatabase, resetTestDatabase, useTestDatabaseEnv } from '../helpers/db';
import { RUN, fopdtInput, person, place, type Person } from '../helpers/workflow';

const ORIGIN = 'http://loopledger.test:8080';
let author: Person;
let reviewerA: Person;
let reviewerB: Person;
let admin: Person;
let viewer: Person;
let areaId: number;
let catcher: MailCatcher;
let port: number;

/** A free TCP port on 127.0.0.1 (bound then released). */
function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const s = createServer();
		s.once('error', reject);
		s.listen(0, '127.0.0.1', () => {
			const a = s.address();
			const p = typeof a === 'object' && a ? a.port : 0;
			s.close(() => resolve(p));
		});
	});
}

const transport = (): MailTransport => createMailTransport({ port });
const caught = async () => CaughtMail.findAll({ order: [['id', 'ASC']] });

/** Deliver everything due (several runs until nothing is claimed). */
async function drain(now = new Date()) {
	const t = transport();
	let total = 0;
	for (let i = 0; i < 20; i++) {
		const r = await deliverPending({ transport: t, now });
		total += r.sent;
		if (r.claimed === 0) break;
	}
	t.close?.();
	return total;
}

async function clearMail() {
	await sequelize().query('DELETE FROM mail_outbox');
	await sequelize().query('DELETE FROM caught_mail');
}

beforeAll(async () => {
	process.env.ORIGIN = ORIGIN;
	process.env.MAIL_FROM = 'Loopledger <loopledger@brackwater.test>';
	resetEnvCache();
	useTestDatabaseEnv();
	await resetTestDatabase();
	initModels();
	author = await person('priya', 'engineer');
	reviewerA = await person('tomas', 'reviewer');
	reviewerB = await person('ines', 'reviewer');
	admin = await person('dana', 'admin');
	viewer = await person('lee', 'viewer');
	({ areaId } = await place('DAI'));
	port = await freePort();
	catcher = await startMailCatcher({ port });
});

afterAll(async () => {
	await catcher?.close();
	delete process.env.ORIGIN;
	delete process.env.MAIL_FROM;
	resetEnvCache();
	await closeTestDatabase();
});

beforeEach(clearMail);

async function modelInReview(tag: string, title = `CIP supply temperature ${tag}`, summary = 'First identification.') {
	const m = await createModel(author.acting, {
		title,
		asset: { areaId, tag: `${tag}-${RUN.slice(-5)}`.toUpperCase(), kind: 'heat_exchanger', name: `CIP heater ${tag}`, description: null },
		revision: fopdtInput({ changeSummary: summary })
	});
	await submitForReview(author.acting, m.revision.id);
	return m;
}

describe('notifications reach the catcher', () => {
	it('review requested: to every active reviewer except the author, with the summary and a link', async () => {
		const m = await modelInReview('tic71', 'CIP supply <temperature>', 'Bump test 2 & fit: "τ" shorter.');
		expect(await drain()).toBe(2);
		const mails = await caught();
		expect(mails.map((x) => x.envelope_to[0]).sort()).toEqual([reviewerA.email, reviewerB.email].sort());
		const toA = mails.find((x) => x.envelope_to[0] === reviewerA.email)!;
		expect(toA.envelope_from).toBe('loopledger@brackwater.test');
		expect(toA.subject).toBe(`[Loopledger] Review requested: ${m.model.asset.tag} — CIP supply <temperature> (rev. 1)`);
		expect(toA.text_body).toContain(`Hello ${reviewerA.name},`);
		expect(toA.text_body).toContain(`${author.name} asks for a review of revision 1 of “CIP supply <temperature>”`);
		expect(toA.text_body).toContain('Bump test 2 & fit: "τ" shorter.');
		expect(toA.text_body).toContain(`${ORIGIN}/models/${m.model.id}`);
		// User text is escaped in the HTML body; the link is there.
		expect(toA.html_body).toContain(escapeHtml('CIP supply <temperature>'));
		expect(toA.html_body).not.toContain('<temperature>');
		expect(toA.html_body).toContain('Bump test 2 &amp; fit: &quot;τ&quot; shorter.');
		expect(toA.html_body).toContain(`href="${ORIGIN}/models/${m.model.id}"`);
		expect(toA.raw_size).toBeGreaterThan(toA.text_body!.length);
		const rows = await MailOutbox.findAll();
		expect(rows.every((r) => r.status === 'sent' && r.attempts === 1 && r.sent_at !== null && r.last_error === null)).toBe(true);
		expect(new Set(mails.map((x) => x.message_id))).toEqual(new Set(rows.map((r) => r.message_id)));
	});

	it('changes requested and approved: to the author only, with the reviewer’s comment', async () => {
		const m = await modelInReview('tic72');
		await clearMail();
		await requestChanges(reviewerA.acting, m.revision.id, { comment: 'Add R² <b>and</b> RMS.' });
		await drain();
		let mails = await caught();
		expect(mails).toHaveLength(1);
		expect(mails[0].envelope_to).toEqual([author.email]);
		expect(mails[0].subject).toBe(`[Loopledger] Changes requested: ${m.model.asset.tag} — CIP supply temperature tic72 (rev. 1)`);
		expect(mails[0].text_body).toContain(`${reviewerA.name} sent revision 1 of “CIP supply temperature tic72”`);
		expect(mails[0].text_body).toContain('Add R² <b>and</b> RMS.');
		expect(mails[0].text_body).toContain('Edit it and submit it again:');
		expect(mails[0].html_body).toContain('Add R² &lt;b&gt;and&lt;/b&gt; RMS.');

		const m2 = await modelInReview('tic73');
		await clearMail();
		await approve(reviewerB.acting, m2.revision.id, { comment: 'Matches the trend.' });
		await drain();
		mails = await caught();
		expect(mails).toHaveLength(1);
		expect(mails[0].envelope_to).toEqual([author.email]);
		expect(mails[0].subject).toBe(`[Loopledger] Approved: ${m2.model.asset.tag} — CIP supply temperature tic73 (rev. 1)`);
		expect(mails[0].text_body).toContain(`${reviewerB.name} approved revision 1`);
		expect(mails[0].text_body).toContain('Matches the trend.');
	});
});

describe('the SMTP server is down, then back', () => {
	it('the outbox keeps the mail, records attempts and back-off, and sends it exactly once when the server is back', async () => {
		await modelInReview('tic74');
		expect(await MailOutbox.count()).toBe(2);
		await catcher.close();
		const t0 = new Date();
		const down = await deliverPending({ transport: transport(), now: t0 });
		expect(down).toEqual({ claimed: 2, sent: 0, retrying: 2, failed: 0 });
		let rows = await MailOutbox.findAll();
		for (const r of rows) {
			expect(r.status).toBe('pending');
			expect(r.attempts).toBe(1);
			expect(r.last_error).toMatch(/ECONNREFUSED|connect/i);
			expect(new Date(r.next_attempt_at).getTime()).toBe(t0.getTime() + backoffSeconds(1) * 1000);
			expect(r.claimed_by).toBeNull();
		}
		// Not due yet: nothing is tried.
		expect((await deliverPending({ transport: transport(), now: new Date(t0.getTime() + 10_000) })).claimed).toBe(0);
		// Due again, still down: second attempt, twice the delay.
		const t1 = new Date(t0.getTime() + 31_000);
		await deliverPending({ transport: transport(), now: t1 });
		rows = await MailOutbox.findAll();
		expect(rows.map((r) => r.attempts)).toEqual([2, 2]);
		expect(new Date(rows[0].next_attempt_at).getTime()).toBe(t1.getTime() + backoffSeconds(2) * 1000);
		expect(await CaughtMail.count()).toBe(0);

		catcher = await startMailCatcher({ port });
		const t2 = new Date(t1.getTime() + 61_000);
		expect(await drain(t2)).toBe(2);
		expect(await drain(new Date(t2.getTime() + 3_600_000))).toBe(0);
		const mails = await caught();
		expect(mails).toHaveLength(2);
		expect(mails.map((m) => m.envelope_to[0]).sort()).toEqual([reviewerA.email, reviewerB.email].sort());
		rows = await MailOutbox.findAll();
		expect(rows.every((r) => r.status === 'sent' && r.attempts === 3)).toBe(true);
	});

	it('back-off doubles from 30 s and stops at one hour (exponential back-off, common practice)', () => {
		expect([1, 2, 3, 4, 7, 8, 20].map(backoffSeconds)).toEqual([30, 60, 120, 240, 1920, 3600, 3600]);
	});

	it('a permanent refusal (SMTP 5xx) ends failed with its error; an administrator can queue it again', async () => {
		await modelInReview('tic75');
		const refusing: MailTransport = {
			sendMail: async () => {
				throw Object.assign(new Error('550 5.1.1 mailbox unavailable'), { responseCode: 550 });
			}
		};
		expect(await deliverPending({ transport: refusing })).toMatchObject({ claimed: 2, failed: 2, retrying: 0 });
		const failed = await listOutbox(admin.acting, { status: 'failed' });
		expect(failed).toHaveLength(2);
		expect(failed[0].lastError).toMatch(/550 5\.1\.1/);
		await expect(listOutbox(viewer.acting)).rejects.toBeInstanceOf(PermissionDenied);
		await retryFailedMail(admin.acting, failed[0].id);
		await expect(retryFailedMail(admin.acting, failed[0].id)).rejects.toThrow(/Only a message that failed/);
		expect(await drain()).toBe(1);
	});
});

describe('the in-process worker', () => {
	it('sends queued mail on its own and stops cleanly; MAIL_WORKER=0 turns it off', async () => {
		await modelInReview('tic77');
		const t = transport();
		const worker = startMailWorker({ intervalMs: 250, transport: t });
		expect(startMailWorker({ intervalMs: 250, transport: t })).toBe(worker);
		const deadline = Date.now() + 15_000;
		while ((await CaughtMail.count()) < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
		await worker.stop();
		t.close?.();
		expect(await CaughtMail.count()).toBe(2);
		expect(await MailOutbox.count({ where: { status: 'sent' } })).toBe(2);

		process.env.MAIL_WORKER = '0';
		resetEnvCache();
		try {
			await modelInReview('tic78');
			const off = startMailWorker({ intervalMs: 250, transport: transport() });
			await new Promise((r) => setTimeout(r, 1_000));
			await off.stop();
			expect(await MailOutbox.count({ where: { status: 'pending' } })).toBe(2);
		} finally {
			delete process.env.MAIL_WORKER;
			resetEnvCache();
		}
	});
});

describe('two workers at once never send the same mail twice', () => {
	it('concurrent claims split the rows; every message is caught exactly once', async () => {
		for (let i = 0; i < 4; i++) await modelInReview(`c${i}`);
		const rows = await MailOutbox.count();
		expect(rows).toBe(8);
		const runs = await Promise.all([0, 1, 2].map(() => deliverPending({ transport: transport(), limit: 5 })));
		const claimed = runs.reduce((n, r) => n + r.claimed, 0);
		expect(claimed).toBeLessThanOrEqual(rows);
		await drain();
		const mails = await caught();
		expect(mails).toHaveLength(rows);
		expect(new Set(mails.map((m) => m.message_id)).size).toBe(rows);
	});
});

describe('weekly revalidation digest', () => {
	it('ISO 8601 weeks match Python’s date.isocalendar()', () => {
		for (const { date, isoWeek: expected } of reference.isoWeeks) expect(isoWeek(new Date(`${date}T12:00:00Z`))).toBe(expected);
	});

	it('to the responsible engineer, models past or within 14 days of revalidate-by; opt-out respected; once per week', async () => {
		const now = new Date('2026-12-01T06:00:00Z');
		const day = (d: number) => new Date(now.getTime() + d * 86_400_000).toISOString().slice(0, 10);
		const optedOut = await person('oskar', 'engineer', { digestOptOut: true });
		const make = async (by: Person, tag: string, revalidateBy: string) => {
			const m = await createModel(by.acting, {
				title: `Silo level ${tag}`,
				asset: { areaId, tag: `${tag}-${RUN.slice(-5)}`.toUpperCase(), kind: 'tank', name: `Silo ${tag}`, description: null },
				revision: fopdtInput({ revalidateBy, testDate: '2025-01-01' })
			});
			await submitForReview(by.acting, m.revision.id);
			await approve(reviewerA.acting, m.revision.id, {});
			return m;
		};
		const overdue = await make(author, 'lic1', day(-3));
		await make(author, 'lic2', day(DIGEST_HORIZON_DAYS));
		await make(author, 'lic3', day(DIGEST_HORIZON_DAYS + 1));
		await make(optedOut, 'lic4', day(-10));
		await clearMail();

		const first = await queueRevalidationDigest(now);
		expect(first).toMatchObject({ isoWeek: '2026-W49', queued: 1, optedOut: 1, alreadyQueued: 0 });
		const again = await queueRevalidationDigest(new Date(now.getTime() + 3 * 86_400_000));
		expect(again).toMatchObject({ isoWeek: '2026-W49', queued: 0, alreadyQueued: 1 });
		expect(await drain()).toBe(1);
		const [mail] = await caught();
		expect(mail.envelope_to).toEqual([author.email]);
		expect(mail.subject).toBe('[Loopledger] 2 models to revalidate (1 overdue) — week 2026-W49');
		expect(mail.text_body).toContain(`revalidate by ${day(-3)} (overdue by 3 days)`);
		expect(mail.text_body).toContain(`revalidate by ${day(DIGEST_HORIZON_DAYS)} (due in 14 days)`);
		expect(mail.text_body).not.toContain('LIC3');
		expect(mail.text_body).toContain(`${ORIGIN}/models/${overdue.model.id}`);
		expect(mail.text_body).toContain(`${ORIGIN}/profile`);
		expect(mail.html_body).toContain('overdue by 3 days');

		const nextWeek = await queueRevalidationDigest(new Date(now.getTime() + 7 * 86_400_000));
		expect(nextWeek).toMatchObject({ isoWeek: '2026-W50', queued: 1 });
		// A withdrawn model is not in the digest.
		await PlantModel.update({ status: 'withdrawn' }, { where: { id: overdue.model.id } });
		await clearMail();
		const later = await queueRevalidationDigest(new Date(now.getTime() + 14 * 86_400_000));
		expect(later).toMatchObject({ isoWeek: '2026-W51', queued: 1, optedOut: 1, models: 3 });
		await drain(new Date(now.getTime() + 14 * 86_400_000));
		const [w51] = await caught();
		expect(w51.subject).toBe('[Loopledger] 2 models to revalidate — week 2026-W51');
		expect(w51.text_body).toContain(`revalidate by ${day(DIGEST_HORIZON_DAYS)} (due today)`);
		expect(w51.text_body).not.toContain(`${ORIGIN}/models/${overdue.model.id}`);
		const rows = await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM audit_events WHERE action = 'mail.digest_queued'`, { type: QueryTypes.SELECT });
		expect(Number(rows[0].n)).toBe(3);
	});
});

describe('caught mail for administrators', () => {
	it('lists newest first with a filter, shows one in full with sanitised HTML; others may not read it', async () => {
		await modelInReview('tic76');
		await drain();
		const t = transport();
		await t.sendMail({
			from: 'someone@brackwater.test',
			to: reviewerA.email,
			subject: 'Hostile <script>',
			text: 'plain',
			html: '<p>Hi <script>alert(1)</script><img src="http://evil.test/x.png"><a href="javascript:alert(1)">x</a><a href="https://ok.test/">ok</a></p>',
			messageId: '<hostile@brackwater.test>'
		});
		t.close?.();
		const list = await listCaughtMail(admin.acting);
		expect(list.total).toBe(3);
		expect(list.items[0].subject).toBe('Hostile <script>');
		expect((await listCaughtMail(admin.acting, { q: reviewerB.email })).total).toBe(1);
		const full = await getCaughtMail(admin.acting, list.items[0].id);
		expect(full.text).toBe('plain');
		expect(full.html).toContain('<script>');
		expect(full.safeHtml).not.toMatch(/script|img|javascript/);
		expect(full.safeHtml).toContain('href="https://ok.test/"');
		await expect(listCaughtMail(reviewerA.acting)).rejects.toBeInstanceOf(PermissionDenied);
		await expect(getCaughtMail(viewer.acting, list.items[0].id)).rejects.toBeInstanceOf(PermissionDenied);
		await expect(getCaughtMail(admin.acting, 999_999)).rejects.toThrow(/no caught message/);
	});
});
