/**
 * The review workflow against a real MariaDB (DB_* from env; the database is reset and migrated):
 * the full journey author → submit → reviewer sends back → author edits → resubmit → a different
 * reviewer approves; four-eyes; the large-change comment; optimistic locking keeping both texts;
 * audit events for every step and an append-only audit log; an injected failure mid-approval
 * leaving no partial state; withdraw, discard, revalidate, history, diff and the review queue.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../../src/lib/server/db/connection';
import { AuditEvent, ModelRevision, PlantModel, RevisionContributor, initModels } from '../../src/lib/server/db/models';
import { MailOutbox } from '../../src/lib/server/db/models-workflow';
import {
	ConflictError,
	WorkflowConflict,
	approve,
	createModel,
	createRevision,
	diffRevisions,
	discardRevision,
	getHistory,
	getRevision,
	listReviewQueue,
	requestChanges,
	revalidate,
	reviewQueueCounts,
	revisionTemplate,
	submitForReview,
	updateDraft,
	withdrawModel
} from '../../src/lib/server/revisions';
import { InvalidInput, NotFound } from '../../src/lib/server/errors';
import { PermissionDenied } from '../../src/lib/auth/roles';
import { closeTestDatabase, resetTestDatabase, useTestDatabaseEnv } from '../helpers/db';
import { RUN, fopdtInput, person, place, type Person } from '../helpers/workflow';

let author: Person;
let coEditor: Person;
let reviewerA: Person;
let reviewerB: Person;
let retired: Person;
let admin: Person;
let viewer: Person;
let areaId: number;

const count = async (table: string, where = '1=1', replacements: Record<string, unknown> = {}) => {
	const rows = await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM ${table} WHERE ${where}`, { type: QueryTypes.SELECT, replacements });
	return Number(rows[0].n);
};
const auditActions = async (entityType: string, entityId: number) =>
	(await AuditEvent.findAll({ where: { entity_type: entityType, entity_id: String(entityId) }, order: [['id', 'ASC']] })).map((e) => e.action);
const outboxFor = async (entityType: string, entityId: number) =>
	MailOutbox.findAll({ where: { entity_type: entityType, entity_id: String(entityId) }, order: [['id', 'ASC']] });

async function newModel(tag: string, by: Person = author) {
	return createModel(by.acting, {
		title: `Proofer humidity ${tag}`,
		asset: { areaId, tag: `${tag}-${RUN.slice(-5)}`.toUpperCase(), kind: 'other', name: `Proofer ${tag}`, description: null },
		revision: fopdtInput()
	});
}

/** A model with revision 1 approved by reviewer B. */
async function approvedModel(tag: string) {
	const created = await newModel(tag);
	await submitForReview(author.acting, created.revision.id);
	await approve(reviewerB.acting, created.revision.id, {});
	return created;
}

beforeAll(async () => {
	useTestDatabaseEnv();
	await resetTestDatabase();
	initModels();
	author = await person('priya', 'engineer');
	coEditor = await person('marek', 'engineer');
	reviewerA = await person('tomas', 'reviewer');
	reviewerB = await person('ines', 'reviewer');
	retired = await person('oskar', 'reviewer', { active: false });
	admin = await person('dana', 'admin');
	viewer = await person('lee', 'viewer');
	({ areaId } = await place('BKY'));
});

afterAll(async () => {
	await closeTestDatabase();
});

describe('the full journey: send back, edit, resubmit, a different reviewer approves', () => {
	let modelId: number;
	let revisionId: number;

	it('the author creates a model (new asset) with its first revision as a draft', async () => {
		const r = await newModel('mic1');
		modelId = r.model.id;
		revisionId = r.revision.id;
		expect(r.model.status).toBe('draft');
		expect(r.revision).toMatchObject({ no: 1, state: 'draft', structure: 'fopdt', delaySeconds: 25, gain: 0.81, version: 0 });
		expect(r.revision.contributors.map((c) => c.id)).toEqual([author.id]);
		expect(await auditActions('plant_model', modelId)).toEqual(['model.create']);
		expect(await count('audit_events', `action = 'asset.create'`)).toBeGreaterThan(0);
	});

	it('the author submits it: every active reviewer who did not write it is notified', async () => {
		const r = await submitForReview(author.acting, revisionId);
		expect(r.revision.state).toBe('in_review');
		expect(r.notified).toBe(2);
		const mails = await outboxFor('model_revision', revisionId);
		expect(mails.map((m) => m.to_address).sort()).toEqual([reviewerA.email, reviewerB.email].sort());
		expect(mails.every((m) => m.kind === 'review_requested' && m.status === 'pending')).toBe(true);
		expect(mails.map((m) => m.to_address)).not.toContain(retired.email);
	});

	it('nobody edits a revision in review', async () => {
		const v = (await getRevision(author.acting, revisionId)).revision.version;
		await expect(updateDraft(author.acting, revisionId, v, fopdtInput({ k: 0.7 }))).rejects.toBeInstanceOf(WorkflowConflict);
	});

	it('the author cannot approve it; an administrator cannot either; a viewer cannot even see it', async () => {
		await expect(approve(author.acting, revisionId, {})).rejects.toBeInstanceOf(PermissionDenied);
		await expect(approve(admin.acting, revisionId, { comment: 'ok' })).rejects.toThrow(/Administrators cannot approve/);
		await expect(getRevision(viewer.acting, revisionId)).rejects.toBeInstanceOf(NotFound);
	});

	it('reviewer A sends it back with a comment; the author is notified', async () => {
		await expect(requestChanges(reviewerA.acting, revisionId, { comment: '  ' })).rejects.toBeInstanceOf(InvalidInput);
		const r = await requestChanges(reviewerA.acting, revisionId, { comment: 'Add the fit quality and a narrower valid range.' });
		expect(r.revision).toMatchObject({ state: 'changes_requested', reviewComment: 'Add the fit quality and a narrower valid range.' });
		expect(r.revision.reviewer?.id).toBe(reviewerA.id);
		const mails = (await outboxFor('model_revision', revisionId)).filter((m) => m.kind === 'changes_requested');
		expect(mails.map((m) => m.to_address)).toEqual([author.email]);
	});

	it('sending back did not make reviewer A a contributor', async () => {
		const ids = (await RevisionContributor.findAll({ where: { revision_id: revisionId } })).map((c) => Number(c.user_id));
		expect(ids).toEqual([author.id]);
	});

	it('the author edits (it becomes a draft again) and resubmits', async () => {
		const view = await getRevision(author.acting, revisionId);
		expect(view.allowed.edit).toBe(true);
		expect(view.allowed.submit).toBe(false);
		const edited = await updateDraft(
			author.acting,
			revisionId,
			view.revision.version,
			fopdtInput({ fitR2: 0.948, fitRmse: 0.9, method: 'least_squares', validRange: 'Valve 20–40 %, 72–84 %RH', changeSummary: 'Least-squares fit with its quality.' })
		);
		expect(edited.revision).toMatchObject({ state: 'draft', version: view.revision.version + 1 });
		expect(edited.revision.provenance).toMatchObject({ fitR2: 0.948, fitRmse: 0.9, validRange: 'Valve 20–40 %, 72–84 %RH' });
		const again = await submitForReview(author.acting, revisionId, { version: edited.revision.version });
		expect(again.revision.state).toBe('in_review');
		expect(again.revision.reviewer).toBeNull();
	});

	it('the rule, precisely: reviewer A only reviewed, so A may approve too; the author and the admin may not', async () => {
		expect((await getRevision(reviewerA.acting, revisionId)).allowed.approve).toBe(true);
		expect((await getRevision(reviewerB.acting, revisionId)).allowed.approve).toBe(true);
		expect((await getRevision(author.acting, revisionId)).allowed.approve).toBe(false);
		expect((await getRevision(admin.acting, revisionId)).allowed.approve).toBe(false);
	});

	it('reviewer B approves: the model becomes active and points at it; the author is notified', async () => {
		const r = await approve(reviewerB.acting, revisionId, {});
		expect(r.revision).toMatchObject({ state: 'approved', reviewer: { id: reviewerB.id } });
		expect(r.revision.approvedAt).not.toBeNull();
		expect(r.model).toMatchObject({ status: 'active', approvedRevisionId: revisionId });
		const approvedMails = (await outboxFor('model_revision', revisionId)).filter((m) => m.kind === 'approved');
		expect(approvedMails.map((m) => m.to_address)).toEqual([author.email]);
	});

	it('an approved revision is immutable', async () => {
		await expect(updateDraft(author.acting, revisionId, 99, fopdtInput())).rejects.toThrow(/cannot change; start a new one/);
		await expect(approve(reviewerA.acting, revisionId, {})).rejects.toBeInstanceOf(WorkflowConflict);
	});

	it('every step left its audit event, in order', async () => {
		expect(await auditActions('model_revision', revisionId)).toEqual([
			'revision.submit',
			'revision.request_changes',
			'revision.update',
			'revision.submit',
			'revision.approve'
		]);
		const approval = await AuditEvent.findOne({ where: { action: 'revision.approve', entity_id: String(revisionId) } });
		expect(approval?.actor_id).toBe(reviewerB.id);
		expect(approval?.after).toMatchObject({ state: 'approved', model: { approvedRevisionId: revisionId } });
	});

	it('the audit log refuses UPDATE and DELETE', async () => {
		await expect(sequelize().query(`UPDATE audit_events SET action = 'x.tampered' WHERE entity_id = :id`, { replacements: { id: String(revisionId) } })).rejects.toThrow(
			/append-only/
		);
		await expect(sequelize().query(`DELETE FROM audit_events WHERE entity_id = :id`, { replacements: { id: String(revisionId) } })).rejects.toThrow(/append-only/);
		expect((await auditActions('model_revision', revisionId)).length).toBe(5);
	});

	it('viewers now see it, with its history', async () => {
		expect((await getRevision(viewer.acting, revisionId)).revision.state).toBe('approved');
		const h = await getHistory(viewer.acting, modelId);
		expect(h.revisions.map((r) => r.no)).toEqual([1]);
	});
});

describe('four-eyes on co-edited revisions', () => {
	it('a reviewer who saved an edit of the draft cannot approve or send it back; another reviewer can', async () => {
		const m = await approvedModel('tic2');
		const draft = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.78, changeSummary: 'Small re-fit.' }));
		const edited = await updateDraft(reviewerA.acting, draft.revision.id, draft.revision.version, fopdtInput({ k: 0.79, changeSummary: 'Small re-fit, corrected.' }));
		expect(edited.revision.contributors.map((c) => c.id).sort()).toEqual([author.id, reviewerA.id].sort());
		await submitForReview(author.acting, draft.revision.id);
		await expect(approve(reviewerA.acting, draft.revision.id, {})).rejects.toThrow(/You edited this revision/);
		await expect(requestChanges(reviewerA.acting, draft.revision.id, { comment: 'x' })).rejects.toBeInstanceOf(PermissionDenied);
		const ok = await approve(reviewerB.acting, draft.revision.id, {});
		expect(ok.revision.state).toBe('approved');
	});

	it('a co-editor who is an engineer may submit the draft', async () => {
		const m = await approvedModel('tic3');
		const draft = await createRevision(author.acting, m.model.id);
		await updateDraft(coEditor.acting, draft.revision.id, draft.revision.version, fopdtInput({ changeSummary: 'Tidied the operating point.' }));
		const r = await submitForReview(coEditor.acting, draft.revision.id);
		// Reviewers other than the author and the co-editor are notified.
		expect(r.notified).toBe(2);
	});
});

describe('large changes need a review comment', () => {
	it('a gain change over 20 % is refused without a comment, naming it; accepted with one; the old revision is superseded', async () => {
		const m = await approvedModel('mic4');
		const draft = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.53, changeSummary: 'New nozzles: lower gain.' }));
		await submitForReview(author.acting, draft.revision.id);
		const view = await getRevision(reviewerA.acting, draft.revision.id);
		expect(view.largeChanges.map((l) => l.parameter)).toEqual(['gain']);
		const refused = await approve(reviewerA.acting, draft.revision.id, {}).catch((e: unknown) => e);
		expect(refused).toBeInstanceOf(InvalidInput);
		expect((refused as InvalidInput).fieldErrors.comment).toMatch(/gain K changed by −34\.6 % \(0\.81 → 0\.53\)/);
		const r = await approve(reviewerA.acting, draft.revision.id, { comment: 'Nozzle change explains the lower gain.' });
		expect(r.largeChanges).toHaveLength(1);
		expect(r.model.approvedRevisionId).toBe(draft.revision.id);
		const old = await ModelRevision.findByPk(m.revision.id);
		expect(old?.state).toBe('superseded');
		expect(await auditActions('model_revision', m.revision.id)).toContain('revision.supersede');
	});

	it('a change of exactly 20 % needs no comment', async () => {
		const m = await approvedModel('mic5');
		const draft = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.648, tau: 216, theta: 30, changeSummary: 'Within 20 %.' }));
		await submitForReview(author.acting, draft.revision.id);
		// 0.81 → 0.648 is −20 %; 180 → 216 is +20 %; 25 → 30 is +20 %
		expect((await approve(reviewerA.acting, draft.revision.id, {})).revision.state).toBe('approved');
	});
});

describe('optimistic locking: two people editing the same draft', () => {
	it('the second save gets a ConflictError with the stored values and its own; nothing is lost', async () => {
		const created = await newModel('tic6');
		const id = created.revision.id;
		const loaded = (await getRevision(author.acting, id)).revision.version;
		const first = fopdtInput({ changeSummary: 'Priya: re-fitted with the second step.', k: 0.77 });
		const second = fopdtInput({ changeSummary: 'Marek: corrected the operating point.', opMv: 32 });
		await updateDraft(author.acting, id, loaded, first);
		const e = await updateDraft(coEditor.acting, id, loaded, second).catch((x: unknown) => x);
		expect(e).toBeInstanceOf(ConflictError);
		const c = e as ConflictError<typeof first>;
		expect(c.status).toBe(409);
		expect(c.message).toMatch(/saved this draft after you opened it/);
		expect(c.current.values.changeSummary).toBe('Priya: re-fitted with the second step.');
		expect(c.current.values.k).toBe(0.77);
		expect(c.current.version).toBe(loaded + 1);
		expect(c.current.updatedBy?.id).toBe(author.id);
		expect(c.rejected.changeSummary).toBe('Marek: corrected the operating point.');
		expect(c.differingFields.sort()).toEqual(['changeSummary', 'k', 'opMv']);
		const stored = await ModelRevision.findByPk(id);
		expect(stored?.change_summary).toBe('Priya: re-fitted with the second step.');
		expect(Number(stored?.version)).toBe(loaded + 1);
		// The rejected editor did not become a contributor.
		expect((await RevisionContributor.findAll({ where: { revision_id: id } })).map((r) => Number(r.user_id))).toEqual([author.id]);
	});

	it('two saves racing with the same version: exactly one wins, the other gets the conflict', async () => {
		const created = await newModel('tic7');
		const id = created.revision.id;
		const v = created.revision.version;
		const results = await Promise.allSettled([
			updateDraft(author.acting, id, v, fopdtInput({ changeSummary: 'Race A' })),
			updateDraft(coEditor.acting, id, v, fopdtInput({ changeSummary: 'Race B' }))
		]);
		const ok = results.filter((r) => r.status === 'fulfilled');
		const bad = results.filter((r) => r.status === 'rejected') as PromiseRejectedResult[];
		expect(ok).toHaveLength(1);
		expect(bad).toHaveLength(1);
		expect(bad[0].reason).toBeInstanceOf(ConflictError);
		const stored = await ModelRevision.findByPk(id);
		expect(Number(stored?.version)).toBe(v + 1);
		expect(['Race A', 'Race B']).toContain(stored?.change_summary);
		expect((bad[0].reason as ConflictError<{ changeSummary: string }>).current.values.changeSummary).toBe(stored?.change_summary);
	});
});

describe('two reviewers deciding at once', () => {
	it('rows are locked model first: one approval wins, the other gets a state conflict; one approval mail', async () => {
		const created = await newModel('tic13');
		await submitForReview(author.acting, created.revision.id);
		const results = await Promise.allSettled([
			approve(reviewerA.acting, created.revision.id, {}),
			requestChanges(reviewerB.acting, created.revision.id, { comment: 'Too slow.' })
		]);
		const ok = results.filter((r) => r.status === 'fulfilled');
		const bad = results.filter((r) => r.status === 'rejected') as PromiseRejectedResult[];
		expect(ok).toHaveLength(1);
		expect(bad).toHaveLength(1);
		expect(bad[0].reason).toBeInstanceOf(WorkflowConflict);
		const state = (await ModelRevision.findByPk(created.revision.id))?.state;
		expect(['approved', 'changes_requested']).toContain(state);
		const decisions = (await outboxFor('model_revision', created.revision.id)).filter((m) => m.kind !== 'review_requested');
		expect(decisions).toHaveLength(1);
		expect(decisions[0].kind).toBe(state === 'approved' ? 'approved' : 'changes_requested');
	});
});

describe('an injected failure mid-approval leaves no partial state', () => {
	for (const failAt of ['revision_saved', 'model_updated', 'audit_recorded', 'outbox_queued'] as const) {
		it(`failure after "${failAt}": revision, model pointer, audit and outbox unchanged`, async () => {
			const m = await approvedModel(`f${failAt.slice(0, 3)}`);
			const draft = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.8, changeSummary: 'Re-fit.' }));
			await submitForReview(author.acting, draft.revision.id);
			const before = {
				revision: (await ModelRevision.findByPk(draft.revision.id))?.toJSON(),
				previous: (await ModelRevision.findByPk(m.revision.id))?.toJSON(),
				model: (await PlantModel.findByPk(m.model.id))?.toJSON(),
				audit: await count('audit_events'),
				outbox: await count('mail_outbox')
			};
			const boom = new Error(`injected failure after ${failAt}`);
			await expect(
				approve(reviewerA.acting, draft.revision.id, { comment: 'Fine.' }, { onStep: (s) => { if (s === failAt) throw boom; } })
			).rejects.toBe(boom);
			expect((await ModelRevision.findByPk(draft.revision.id))?.toJSON()).toEqual(before.revision);
			expect((await ModelRevision.findByPk(m.revision.id))?.toJSON()).toEqual(before.previous);
			expect((await PlantModel.findByPk(m.model.id))?.toJSON()).toEqual(before.model);
			expect(await count('audit_events')).toBe(before.audit);
			expect(await count('mail_outbox')).toBe(before.outbox);
			// And the same approval without the failure goes through.
			expect((await approve(reviewerA.acting, draft.revision.id, { comment: 'Fine.' })).revision.state).toBe('approved');
		});
	}

	it('a failure in the middle of a submit leaves no mail queued', async () => {
		const created = await newModel('fsub');
		const outbox = await count('mail_outbox');
		await expect(submitForReview(author.acting, created.revision.id, {}, { onStep: (s) => { if (s === 'outbox_queued') throw new Error('crash'); } })).rejects.toThrow('crash');
		expect(await count('mail_outbox')).toBe(outbox);
		expect((await ModelRevision.findByPk(created.revision.id))?.state).toBe('draft');
	});
});

describe('new revisions, discard, withdraw and revalidate', () => {
	it('only one open revision per model; the template copies the approved values', async () => {
		const m = await approvedModel('tic8');
		const t = await revisionTemplate(author.acting, m.model.id);
		expect(t.values).toMatchObject({ k: 0.81, tau: 180, theta: 25, changeSummary: '' });
		const d = await createRevision(author.acting, m.model.id);
		expect(d.revision).toMatchObject({ no: 2, state: 'draft', baseRevisionId: m.revision.id, changeSummary: null, gain: 0.81 });
		await expect(createRevision(coEditor.acting, m.model.id)).rejects.toThrow(/Revision 2 is already open \(draft\)/);
		await expect(submitForReview(author.acting, d.revision.id)).rejects.toThrow(/describe the change/);
		const discarded = await discardRevision(author.acting, d.revision.id, { comment: 'Started by mistake.' });
		expect(discarded.revision.state).toBe('withdrawn');
		expect(discarded.model.status).toBe('active');
		expect((await createRevision(coEditor.acting, m.model.id)).revision.no).toBe(3);
	});

	it('discarding the only draft of a never-approved model withdraws the model', async () => {
		const created = await newModel('tic9');
		await expect(discardRevision(coEditor.acting, created.revision.id)).rejects.toBeInstanceOf(PermissionDenied);
		const r = await discardRevision(author.acting, created.revision.id);
		expect(r.model.status).toBe('withdrawn');
	});

	it('withdraw: engineers may not; administrators may, with a reason; open revisions end withdrawn; nothing changes afterwards', async () => {
		const m = await approvedModel('tic10');
		const draft = await createRevision(author.acting, m.model.id, fopdtInput({ changeSummary: 'Pending change.' }));
		await expect(withdrawModel(author.acting, m.model.id, { reason: 'Replaced.' })).rejects.toBeInstanceOf(PermissionDenied);
		await expect(withdrawModel(admin.acting, m.model.id, { reason: ' ' })).rejects.toBeInstanceOf(InvalidInput);
		const w = await withdrawModel(admin.acting, m.model.id, { reason: 'Burner replaced; model no longer valid.' });
		expect(w.status).toBe('withdrawn');
		expect((await ModelRevision.findByPk(draft.revision.id))?.state).toBe('withdrawn');
		expect((await ModelRevision.findByPk(m.revision.id))?.state).toBe('withdrawn');
		const stored = await PlantModel.findByPk(m.model.id);
		expect(stored).toMatchObject({ withdrawn_by: admin.id, withdrawn_reason: 'Burner replaced; model no longer valid.', approved_revision_id: m.revision.id });
		await expect(createRevision(author.acting, m.model.id)).rejects.toThrow(/withdrawn/);
		await expect(withdrawModel(reviewerA.acting, m.model.id, { reason: 'again' })).rejects.toBeInstanceOf(WorkflowConflict);
		expect(await auditActions('plant_model', m.model.id)).toEqual(['model.create', 'model.withdraw']);
	});

	it('revalidate: a reviewer who did not write it re-approves it with a new date, recorded as a new revision', async () => {
		const m = await approvedModel('tic11');
		await expect(revalidate(author.acting, m.model.id, { revalidateBy: '2030-01-01' })).rejects.toBeInstanceOf(PermissionDenied);
		await expect(revalidate(reviewerA.acting, m.model.id, { revalidateBy: '2026-01-01' }, { today: '2026-12-01' })).rejects.toThrow(/after today/);
		const r = await revalidate(reviewerA.acting, m.model.id, { revalidateBy: '2028-06-30', comment: 'Checked against last month’s trend.' }, { today: '2026-12-01' });
		expect(r.revision).toMatchObject({
			no: 2,
			state: 'approved',
			isRevalidation: true,
			author: { id: author.id },
			reviewer: { id: reviewerA.id },
			gain: 0.81,
			baseRevisionId: m.revision.id
		});
		expect(r.revision.provenance.revalidateBy).toBe('2028-06-30');
		expect(r.model.approvedRevisionId).toBe(r.revision.id);
		expect((await ModelRevision.findByPk(m.revision.id))?.state).toBe('superseded');
		// The author stays the author; four-eyes still applies to them on the new revision.
		await expect(revalidate(author.acting, m.model.id, { revalidateBy: '2029-01-01' })).rejects.toBeInstanceOf(PermissionDenied);
		const d = await diffRevisions(reviewerB.acting, m.revision.id, r.revision.id);
		expect(d.fields.filter((f) => f.changed).map((f) => f.key)).toEqual(['revalidateBy']);
		expect(d.largeChanges).toEqual([]);
	});
});

describe('reads: history, diff, review queue', () => {
	it('history lists every revision newest first with people, dates and comments; viewers see approved ones only', async () => {
		const m = await approvedModel('tic12');
		const d = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.6, changeSummary: 'Second bump test.' }));
		await submitForReview(author.acting, d.revision.id);
		await requestChanges(reviewerA.acting, d.revision.id, { comment: 'Attach the CSV.' });
		const h = await getHistory(reviewerB.acting, m.model.id);
		expect(h.revisions.map((r) => [r.no, r.state])).toEqual([
			[2, 'changes_requested'],
			[1, 'approved']
		]);
		expect(h.revisions[0]).toMatchObject({ reviewComment: 'Attach the CSV.', reviewer: { id: reviewerA.id }, author: { id: author.id } });
		expect(h.revisions[1].reviewer?.id).toBe(reviewerB.id);
		expect((await getHistory(viewer.acting, m.model.id)).revisions.map((r) => r.no)).toEqual([1]);
		await expect(diffRevisions(viewer.acting, m.revision.id, d.revision.id)).rejects.toBeInstanceOf(NotFound);
		const diff = await diffRevisions(reviewerB.acting, m.revision.id, d.revision.id);
		const k = diff.parameters.find((p) => p.key === 'k');
		expect(k?.changePercent).toBeCloseTo(((0.6 - 0.81) / 0.81) * 100, 10);
		expect(diff.texts.find((t) => t.key === 'changeSummary')?.changed).toBe(true);
	});

	it('the queue lists what waits, oldest first, with who may review it; counts for the navigation', async () => {
		const m1 = await newModel('q1');
		const m2 = await newModel('q2', coEditor);
		await submitForReview(author.acting, m1.revision.id);
		await submitForReview(coEditor.acting, m2.revision.id);
		const forA = await listReviewQueue(reviewerA.acting);
		const ids = forA.map((i) => i.id);
		expect(ids.indexOf(m1.revision.id)).toBeLessThan(ids.indexOf(m2.revision.id));
		const item = forA.find((i) => i.id === m1.revision.id);
		expect(item).toMatchObject({ kind: 'model_revision', modelId: m1.model.id, revisionNo: 1, author: { id: author.id }, canReview: true });
		const forAuthor = await listReviewQueue(author.acting, { kind: 'model_revision' });
		expect(forAuthor.find((i) => i.id === m1.revision.id)?.canReview).toBe(false);
		expect((await listReviewQueue(author.acting, { authorId: coEditor.id })).map((i) => i.id)).toEqual([m2.revision.id]);
		const counts = await reviewQueueCounts(reviewerA.acting);
		expect(counts.waiting).toBe(forA.length);
		expect(counts.forYou).toBe(forA.filter((i) => i.canReview).length);
		await expect(listReviewQueue(viewer.acting)).rejects.toBeInstanceOf(PermissionDenied);
	});
});
