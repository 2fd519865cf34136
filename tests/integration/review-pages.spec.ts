/**
 * The read services behind the review pages, against a real MariaDB (DB_* from env; the database
 * is reset and migrated): the audit-log search (actor, action, prefix, entity, inclusive UTC day
 * range, paging) and its keyset batches for the CSV export; the review queue page (why a reader
 * may not review, the change size against the approved revision, stale flags, filters); and the
 * model page showing a chosen revision (`?revision=`).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, initModels } from '../../src/lib/server/db/models';
import { auditBatches, searchAudit } from '../../src/lib/server/audit-log';
import { reviewQueuePage } from '../../src/lib/server/review-queue';
import { approve, createModel, createRevision, revalidate, submitForReview } from '../../src/lib/server/revisions';
import { getModelPage } from '../../src/lib/server/models';
import { NotFound } from '../../src/lib/server/errors';
import { PermissionDenied } from '../../src/lib/auth/roles';
import { closeTestDatabase, resetTestDatabase, useTestDatabaseEnv } from '../helpers/db';
import { RUN, fopdtInput, person, place, type Person } from '../helpers/workflow';

let author: Person;
let other: Person;
let reviewerA: Person;
let reviewerB: Person;
let admin: Person;
let viewer: Person;
let areaId: number;
let siteId: number;

/** An audit row at a chosen instant (the log accepts inserts; only updates and deletes are refused). */
async function event(at: string, action: string, email: string | null, entity: [string, string]) {
	const row = await AuditEvent.create({
		at: new Date(at),
		actor_id: email === null ? null : admin.id,
		actor_email: email,
		action,
		entity_type: entity[0],
		entity_id: entity[1],
		before: { state: 'a' },
		after: { state: 'b' },
		ip: '127.0.0.1'
	});
	return Number(row.id);
}

beforeAll(async () => {
	useTestDatabaseEnv();
	await resetTestDatabase();
	initModels();
	author = await person('priya', 'engineer');
	other = await person('marek', 'engineer');
	reviewerA = await person('tomas', 'reviewer');
	reviewerB = await person('ines', 'reviewer');
	admin = await person('grace', 'admin');
	viewer = await person('olu', 'viewer');
	({ areaId, siteId } = await place('RVP'));
});

afterAll(async () => {
	await closeTestDatabase();
});

describe('searchAudit and auditBatches', () => {
	const tag = `t${RUN}`.slice(0, 20);
	const ids: Record<string, number> = {};
	beforeAll(async () => {
		ids.firstDayStart = await event('2026-03-01T00:00:00.000Z', `${tag}.alpha`, `first.${tag}@audit.invalid`, ['widget', '1']);
		ids.firstDayEnd = await event('2026-03-01T23:59:59.999Z', `${tag}.beta`, `second.${tag}@audit.invalid`, ['widget', '2']);
		ids.nextDay = await event('2026-03-02T00:00:00.000Z', `${tag}.alpha`, `first.${tag}@audit.invalid`, ['gadget', '1']);
		ids.system = await event('2026-03-05T12:00:00.000Z', `${tag}.gamma`, null, ['widget', '1']);
		for (let i = 0; i < 7; i++) await event(`2026-04-0${i + 1}T08:00:00.000Z`, `${tag}.paged`, `pager.${tag}@audit.invalid`, ['widget', String(10 + i)]);
	});

	it('filters by exact action and by prefix, newest first', async () => {
		const exact = await searchAudit(admin.acting, { action: `${tag}.alpha` });
		expect(exact.items.map((e) => e.id)).toEqual([ids.nextDay, ids.firstDayStart]);
		const prefix = await searchAudit(admin.acting, { action: `${tag}.*` });
		expect(prefix.total).toBe(11);
		expect(prefix.items.map((e) => e.id)).toEqual([...prefix.items.map((e) => e.id)].sort((a, b) => b - a));
	});

	it('filters by part of the actor e-mail, and "system" finds events without an actor', async () => {
		const first = await searchAudit(admin.acting, { actor: `FIRST.${tag}`, action: `${tag}.*` });
		expect(first.items.map((e) => e.id).sort()).toEqual([ids.firstDayStart, ids.nextDay].sort());
		const system = await searchAudit(admin.acting, { actor: 'system', action: `${tag}.*` });
		expect(system.items.map((e) => e.id)).toEqual([ids.system]);
	});

	it('filters by entity type and id', async () => {
		const r = await searchAudit(admin.acting, { action: `${tag}.*`, entityType: 'widget', entityId: '1' });
		expect(r.items.map((e) => e.id).sort()).toEqual([ids.firstDayStart, ids.system].sort());
	});

	it('includes both ends of the UTC day range (00:00:00.000 and 23:59:59.999) and nothing beyond', async () => {
		const day = await searchAudit(admin.acting, { action: `${tag}.*`, from: '2026-03-01', to: '2026-03-01' });
		expect(day.items.map((e) => e.id).sort()).toEqual([ids.firstDayStart, ids.firstDayEnd].sort());
		const from = await searchAudit(admin.acting, { action: `${tag}.*`, from: '2026-03-02', to: '2026-03-31' });
		expect(from.items.map((e) => e.id).sort()).toEqual([ids.nextDay, ids.system].sort());
	});

	it('pages with a fixed size and clamps a page past the end to the last one', async () => {
		const p1 = await searchAudit(admin.acting, { action: `${tag}.paged` }, 1, 3);
		const p3 = await searchAudit(admin.acting, { action: `${tag}.paged` }, 3, 3);
		const p9 = await searchAudit(admin.acting, { action: `${tag}.paged` }, 9, 3);
		expect([p1.total, p1.pageCount, p1.items.length]).toEqual([7, 3, 3]);
		expect(p3.items).toHaveLength(1);
		expect(p9.page).toBe(3);
		expect(p9.items.map((e) => e.id)).toEqual(p3.items.map((e) => e.id));
		expect(p1.items[0].before).toEqual({ state: 'a' });
	});

	it('batches every match exactly once, newest first, and stops at maxRows', async () => {
		const seen: number[] = [];
		for await (const batch of auditBatches(admin.acting, { action: `${tag}.*` }, { batchSize: 4 })) {
			expect(batch.length).toBeLessThanOrEqual(4);
			seen.push(...batch.map((e) => e.id));
		}
		const all = (await searchAudit(admin.acting, { action: `${tag}.*` }, 1, 100)).items.map((e) => e.id);
		expect(seen).toEqual(all);
		const capped: number[] = [];
		for await (const batch of auditBatches(admin.acting, { action: `${tag}.*` }, { batchSize: 4, maxRows: 5 })) capped.push(...batch.map((e) => e.id));
		expect(capped).toEqual(all.slice(0, 5));
	});

	it('is for administrators only', async () => {
		await expect(searchAudit(reviewerA.acting, {})).rejects.toBeInstanceOf(PermissionDenied);
		await expect(auditBatches(viewer.acting, {}).next()).rejects.toBeInstanceOf(PermissionDenied);
	});
});

describe('reviewQueuePage', () => {
	let ownRevisionId: number;
	let largeRevisionId: number;
	let newModelRevisionId: number;
	beforeAll(async () => {
		// A model approved long ago and now overdue (revalidate-by in the past), with a large change in review.
		const m1 = await createModel(author.acting, {
			title: `Queue large ${RUN}`,
			asset: { areaId, tag: `QL-${RUN.slice(-6)}`.toUpperCase(), kind: 'oven', name: 'Oven', description: null },
			revision: fopdtInput({ revalidateBy: '2026-09-01' })
		});
		await submitForReview(author.acting, m1.revision.id);
		await approve(reviewerB.acting, m1.revision.id, {});
		const r2 = await createRevision(author.acting, m1.model.id, fopdtInput({ k: 0.81 * 1.35, tau: 180, theta: 25, changeSummary: 'Gain up 35 %.' }));
		await submitForReview(author.acting, r2.revision.id);
		largeRevisionId = r2.revision.id;
		// A new model written by reviewer A (they may not review it).
		const m2 = await createModel(reviewerA.acting, {
			title: `Queue own ${RUN}`,
			asset: { areaId, tag: `QO-${RUN.slice(-6)}`.toUpperCase(), kind: 'tank', name: 'Tank', description: null },
			revision: fopdtInput()
		});
		await submitForReview(reviewerA.acting, m2.revision.id);
		ownRevisionId = m2.revision.id;
		// A brand-new model by another engineer.
		const m3 = await createModel(other.acting, {
			title: `Queue new ${RUN}`,
			asset: { areaId, tag: `QN-${RUN.slice(-6)}`.toUpperCase(), kind: 'pump', name: 'Pump', description: null },
			revision: fopdtInput({ structure: 'ipdt', tau: null, k: 0.004, theta: 3 })
		});
		await submitForReview(other.acting, m3.revision.id);
		newModelRevisionId = m3.revision.id;
	});

	it('says why reviewer A may not review their own revision, and lets reviewer B review it', async () => {
		const a = await reviewQueuePage(reviewerA.acting, {}, new Date('2026-12-01T12:00:00Z'));
		const own = a.rows.find((r) => r.id === ownRevisionId)!;
		expect(own.canReview).toBe(false);
		expect(own.cannotReview).toMatch(/You wrote this revision, so you cannot approve this revision/);
		const b = await reviewQueuePage(reviewerB.acting, {}, new Date('2026-12-01T12:00:00Z'));
		expect(b.rows.find((r) => r.id === ownRevisionId)!.canReview).toBe(true);
		expect(b.forYou).toBe(3);
	});

	it('tells administrators they never review', async () => {
		const page = await reviewQueuePage(admin.acting, {}, new Date('2026-12-01T12:00:00Z'));
		expect(page.rows.every((r) => !r.canReview && /Administrators cannot/.test(r.cannotReview ?? ''))).toBe(true);
	});

	it('measures the change against the approved revision: +35 % gain is large; a new model is new', async () => {
		const page = await reviewQueuePage(reviewerB.acting, {}, new Date('2026-12-01T12:00:00Z'));
		const large = page.rows.find((r) => r.id === largeRevisionId)!;
		expect(large.change.isNew).toBe(false);
		// (1.0935 − 0.81)/0.81 = 0.35 exactly in decimal (hand calculation).
		expect(large.change.largestPercent).toBeCloseTo(35, 9);
		expect(large.change.parts[0]).toBe('K +35 %');
		expect(large.change.largeChanges.join(' ')).toMatch(/gain K changed by \+35 %/);
		expect(page.rows.find((r) => r.id === newModelRevisionId)!.change).toMatchObject({ isNew: true, largestPercent: null });
	});

	it('flags a model whose approved revision is past revalidate-by (2026-09-01 before 2026-12-01)', async () => {
		const page = await reviewQueuePage(reviewerB.acting, {}, new Date('2026-12-01T12:00:00Z'));
		const large = page.rows.find((r) => r.id === largeRevisionId)!;
		expect([large.revalidateBy, large.stale]).toEqual(['2026-09-01', true]);
		const before = await reviewQueuePage(reviewerB.acting, {}, new Date('2026-08-31T12:00:00Z'));
		expect(before.rows.find((r) => r.id === largeRevisionId)!.stale).toBe(false);
	});

	it('filters by site, structure, author, waiting time and what the reader may review', async () => {
		const now = new Date(Date.now() + 3 * 86_400_000);
		const page = (f: Parameters<typeof reviewQueuePage>[1]) => reviewQueuePage(reviewerA.acting, f, now);
		expect((await page({ structure: 'ipdt' })).rows.map((r) => r.id)).toEqual([newModelRevisionId]);
		expect((await page({ authorId: author.id })).rows.map((r) => r.id)).toEqual([largeRevisionId]);
		expect((await page({ reviewableOnly: true })).rows.map((r) => r.id)).not.toContain(ownRevisionId);
		expect((await page({ siteId })).rows).toHaveLength(3);
		expect((await page({ siteId: siteId + 999 })).rows).toHaveLength(0);
		expect((await page({ minWaitingDays: 3 })).rows).toHaveLength(3);
		expect((await page({ minWaitingDays: 7 })).rows).toHaveLength(0);
		const all = await page({ structure: 'ipdt' });
		expect(all.total).toBe(3);
		expect(all.options.structures).toEqual(['fopdt', 'ipdt']);
	});

	it('is refused to viewers', async () => {
		await expect(reviewQueuePage(viewer.acting, {})).rejects.toBeInstanceOf(PermissionDenied);
	});
});

describe('getModelPage with a chosen revision', () => {
	it('shows the approved revision by default, the open one when asked, and refuses a viewer the draft', async () => {
		const m = await createModel(author.acting, {
			title: `Switch ${RUN}`,
			asset: { areaId, tag: `SW-${RUN.slice(-6)}`.toUpperCase(), kind: 'fan', name: 'Fan', description: null },
			revision: fopdtInput()
		});
		await submitForReview(author.acting, m.revision.id);
		await approve(reviewerB.acting, m.revision.id, {});
		const r2 = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.9, changeSummary: 'Gain up.' }));
		const actor = { id: reviewerA.id, role: reviewerA.role };
		const byDefault = await getModelPage(actor, m.model.id, '2026-12-01');
		expect(byDefault.revision.id).toBe(m.revision.id);
		expect(byDefault.approvedRevisionId).toBe(m.revision.id);
		expect(byDefault.pending).toMatchObject({ id: r2.revision.id, no: 2, state: 'draft' });
		const chosen = await getModelPage(actor, m.model.id, '2026-12-01', { revisionId: r2.revision.id });
		expect(chosen.revision.id).toBe(r2.revision.id);
		expect(chosen.revision.parameters.k).toBe(0.9);
		await expect(getModelPage({ id: viewer.id, role: 'viewer' }, m.model.id, '2026-12-01', { revisionId: r2.revision.id })).rejects.toBeInstanceOf(NotFound);
		await expect(getModelPage(actor, m.model.id, '2026-12-01', { revisionId: 999999999 })).rejects.toBeInstanceOf(NotFound);
	});

	it('keeps the stale flag on the approved revision while another is shown', async () => {
		const m = await createModel(author.acting, {
			title: `Stale ${RUN}`,
			asset: { areaId, tag: `ST-${RUN.slice(-6)}`.toUpperCase(), kind: 'dryer', name: 'Dryer', description: null },
			revision: fopdtInput({ revalidateBy: '2026-10-01' })
		});
		await submitForReview(author.acting, m.revision.id);
		await approve(reviewerB.acting, m.revision.id, {});
		const r2 = await createRevision(author.acting, m.model.id, fopdtInput({ revalidateBy: '2028-01-01', changeSummary: 'New test.' }));
		const actor = { id: reviewerA.id, role: reviewerA.role };
		expect((await getModelPage(actor, m.model.id, '2026-12-01', { revisionId: r2.revision.id })).stale).toBe(true);
		// An open revision does not block revalidating the approved one.
		await revalidate(reviewerA.acting, m.model.id, { revalidateBy: '2027-12-01' }, { today: '2026-12-01' });
		expect((await getModelPage(actor, m.model.id, '2026-12-01')).stale).toBe(false);
	});
});
