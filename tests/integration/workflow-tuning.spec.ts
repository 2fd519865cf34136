/**
 * Tuning sets through the review workflow against a real MariaDB: saved as drafts against the
 * approved model revision, edited with optimistic locking, submitted (reviewers notified),
 * four-eyes, approval superseding the previous approved set of the same loop tag, refusal when
 * the model revision is no longer the approved one, audit events, and rollback on failure.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../../src/lib/server/db/connection';
import { AuditEvent, TuningSet, initModels } from '../../src/lib/server/db/models';
import { MailOutbox } from '../../src/lib/server/db/models-workflow';
import { approve, createModel, createRevision, listReviewQueue, submitForReview, withdrawModel } from '../../src/lib/server/revisions';
import {
	approveTuningSet,
	discardTuningSet,
	getTuningSet,
	openTuningSets,
	requestTuningChanges,
	saveTuningDraft,
	submitTuningSet,
	updateTuningDraft
} from '../../src/lib/server/tuning-sets';
import { tuningSetSchema, type TuningSetInput } from '../../src/lib/schemas/tuning-set';
import { ConflictError, WorkflowConflict } from '../../src/lib/server/workflow-common';
import { NotFound } from '../../src/lib/server/errors';
import { PermissionDenied } from '../../src/lib/auth/roles';
import { closeTestDatabase, resetTestDatabase, useTestDatabaseEnv } from '../helpers/db';
import { RUN, fopdtInput, person, place, type Person } from '../helpers/workflow';

let author: Person;
let coEditor: Person;
let reviewerA: Person;
let reviewerB: Person;
let admin: Person;
let viewer: Person;
let areaId: number;

const settings = (over: Record<string, unknown> = {}): TuningSetInput =>
	tuningSetSchema().parse({
		loopTag: 'tic-7101',
		controllerType: 'PI',
		form: 'ideal',
		kp: '2.64',
		ti: '180',
		rule: 'simc',
		ruleParameter: '25',
		predicted: JSON.stringify({ overshootPercent: 4.1, settlingTimeSeconds: 410, gainMarginDb: 9.2, phaseMarginDeg: 61, ms: 1.6 }),
		notes: 'SIMC with τc = θ; checked on the bench.',
		...over
	});

async function approvedModel(tag: string) {
	const m = await createModel(author.acting, {
		title: `CIP supply temperature ${tag}`,
		asset: { areaId, tag: `${tag}-${RUN.slice(-5)}`.toUpperCase(), kind: 'heat_exchanger', name: `CIP heater ${tag}`, description: null },
		revision: fopdtInput()
	});
	await submitForReview(author.acting, m.revision.id);
	await approve(reviewerB.acting, m.revision.id, {});
	return m;
}

beforeAll(async () => {
	useTestDatabaseEnv();
	await resetTestDatabase();
	initModels();
	author = await person('priya', 'engineer');
	coEditor = await person('marek', 'engineer');
	reviewerA = await person('tomas', 'reviewer');
	reviewerB = await person('ines', 'reviewer');
	admin = await person('dana', 'admin');
	viewer = await person('lee', 'viewer');
	({ areaId } = await place('DAI'));
});

afterAll(async () => {
	await closeTestDatabase();
});

describe('tuning-set schema', () => {
	it('parses the bench’s form: times in s or min, only the controller’s terms kept', () => {
		expect(settings()).toMatchObject({ loopTag: 'TIC-7101', controllerType: 'PI', kp: 2.64, tiSeconds: 180, tdSeconds: null, filterN: null, ruleParameter: 25 });
		expect(settings({ controllerType: 'PID', ti: '3', td: '0.5', filterN: '10', timeUnit: 'min' })).toMatchObject({ tiSeconds: 180, tdSeconds: 30, filterN: 10 });
		expect(settings({ controllerType: 'P', ti: '3' })).toMatchObject({ tiSeconds: null, tdSeconds: null });
	});
	it('names the field in every message', () => {
		const r = tuningSetSchema().safeParse({ loopTag: 'bad tag', controllerType: 'PID', kp: '0', ti: '-1', predicted: '{"x": "y"}', weightB: '2' });
		expect(r.success).toBe(false);
		if (!r.success) {
			const byField = Object.fromEntries(r.error.issues.map((i) => [String(i.path[0]), i.message]));
			expect(byField.loopTag).toMatch(/^Loop tag:/);
			expect(byField.kp).toBe('Gain Kp must not be zero.');
			expect(byField.ti).toBe('Integral time Ti must be greater than zero.');
			expect(byField.td).toBe('Derivative time Td: enter a value for a PID controller.');
			expect(byField.predicted).toMatch(/^Predicted metrics/);
			expect(byField.weightB).toBe('Set-point weight b must be between 0 and 1.');
		}
	});
});

describe('tuning sets through review', () => {
	it('a draft is saved against the approved revision; not on a never-approved model; not by viewers or admins', async () => {
		const m = await approvedModel('ts1');
		const t = await saveTuningDraft(author.acting, m.model.id, settings());
		expect(t).toMatchObject({ state: 'draft', modelRevisionId: m.revision.id, revisionNo: 1, onApprovedRevision: true, loopTag: 'TIC-7101', kp: 2.64, tiSeconds: 180 });
		expect(t.predicted).toEqual({ overshootPercent: 4.1, settlingTimeSeconds: 410, gainMarginDb: 9.2, phaseMarginDeg: 61, ms: 1.6 });
		await expect(saveTuningDraft(viewer.acting, m.model.id, settings())).rejects.toBeInstanceOf(PermissionDenied);
		await expect(saveTuningDraft(admin.acting, m.model.id, settings())).rejects.toBeInstanceOf(PermissionDenied);
		const draftModel = await createModel(author.acting, {
			title: 'Never approved',
			asset: { areaId, tag: `TS0-${RUN.slice(-5)}`.toUpperCase(), kind: 'pump', name: 'Pump', description: null },
			revision: fopdtInput()
		});
		await expect(saveTuningDraft(author.acting, draftModel.model.id, settings())).rejects.toThrow(/approved model revision/);
		expect((await AuditEvent.findAll({ where: { entity_type: 'tuning_set', entity_id: String(t.id) } })).map((e) => e.action)).toEqual(['tuning_set.create']);
		await expect(getTuningSet(viewer.acting, t.id)).rejects.toBeInstanceOf(NotFound);
	});

	it('edit conflicts keep both versions; send back, edit, resubmit; a different reviewer approves; previous approved set superseded', async () => {
		const m = await approvedModel('ts2');
		const first = await saveTuningDraft(author.acting, m.model.id, settings());
		await submitTuningSet(author.acting, first.id);
		await approveTuningSet(reviewerA.acting, first.id, {});

		const t = await saveTuningDraft(author.acting, m.model.id, settings({ kp: '2.2', notes: 'Gentler: λ = 2θ.' }));
		await updateTuningDraft(coEditor.acting, t.id, t.version, settings({ kp: '2.3', notes: 'Marek: 2.3 after bench check.' }));
		const conflict = await updateTuningDraft(author.acting, t.id, t.version, settings({ kp: '2.1' })).catch((e: unknown) => e);
		expect(conflict).toBeInstanceOf(ConflictError);
		expect((conflict as ConflictError<TuningSetInput>).current.values.kp).toBe(2.3);
		expect((conflict as ConflictError<TuningSetInput>).rejected.kp).toBe(2.1);

		const outboxBefore = await MailOutbox.count();
		const submitted = await submitTuningSet(coEditor.acting, t.id);
		expect(submitted.notified).toBe(2);
		const mails = await MailOutbox.findAll({ where: { entity_type: 'tuning_set', entity_id: String(t.id) } });
		expect(mails.map((x) => x.kind)).toEqual(['tuning_review_requested', 'tuning_review_requested']);
		expect(await MailOutbox.count()).toBe(outboxBefore + 2);

		expect((await listReviewQueue(reviewerA.acting, { kind: 'tuning_set' })).find((i) => i.id === t.id)).toMatchObject({ loopTag: 'TIC-7101', canReview: true });
		await expect(approveTuningSet(author.acting, t.id, {})).rejects.toThrow(/Only reviewers can approve this tuning set/);
		await expect(approveTuningSet(admin.acting, t.id, {})).rejects.toThrow(/Administrators cannot approve/);
		await requestTuningChanges(reviewerA.acting, t.id, { comment: 'Add the load-disturbance metrics.' });
		const again = await getTuningSet(author.acting, t.id);
		expect(again.allowed).toMatchObject({ edit: true, submit: false, approve: false });
		const edited = await updateTuningDraft(author.acting, t.id, again.tuningSet.version, settings({ kp: '2.3', predicted: JSON.stringify({ iaeLoad: 31.5 }) }));
		await submitTuningSet(author.acting, t.id, { version: edited.version });
		const approved = await approveTuningSet(reviewerB.acting, t.id, { comment: 'Bench response checked.' });
		expect(approved).toMatchObject({ state: 'approved', reviewer: { id: reviewerB.id }, reviewComment: 'Bench response checked.' });
		expect((await TuningSet.findByPk(first.id))?.state).toBe('superseded');
		const actions = (await AuditEvent.findAll({ where: { entity_type: 'tuning_set', entity_id: String(t.id) }, order: [['id', 'ASC']] })).map((e) => e.action);
		expect(actions).toEqual([
			'tuning_set.create',
			'tuning_set.update',
			'tuning_set.submit',
			'tuning_set.request_changes',
			'tuning_set.update',
			'tuning_set.submit',
			'tuning_set.approve'
		]);
		expect((await getTuningSet(viewer.acting, t.id)).tuningSet.state).toBe('approved');
	});

	it('four-eyes: a reviewer who wrote or edited a tuning set cannot approve it', async () => {
		const m = await approvedModel('ts5');
		const own = await saveTuningDraft(reviewerA.acting, m.model.id, settings());
		await submitTuningSet(reviewerA.acting, own.id);
		await expect(approveTuningSet(reviewerA.acting, own.id, {})).rejects.toThrow(/You wrote this tuning set/);
		const other = await saveTuningDraft(author.acting, m.model.id, settings({ loopTag: 'TIC-7102' }));
		await updateTuningDraft(reviewerB.acting, other.id, other.version, settings({ loopTag: 'TIC-7102', kp: '2.5' }));
		await submitTuningSet(author.acting, other.id);
		await expect(requestTuningChanges(reviewerB.acting, other.id, { comment: 'x' })).rejects.toThrow(/You edited this tuning set/);
		expect((await approveTuningSet(reviewerA.acting, other.id, {})).state).toBe('approved');
	});

	it('a tuning set computed on a superseded model revision cannot be approved', async () => {
		const m = await approvedModel('ts3');
		const t = await saveTuningDraft(author.acting, m.model.id, settings());
		await submitTuningSet(author.acting, t.id);
		const r2 = await createRevision(author.acting, m.model.id, fopdtInput({ k: 0.8, changeSummary: 'Re-fit.' }));
		await submitForReview(author.acting, r2.revision.id);
		await approve(reviewerA.acting, r2.revision.id, {});
		const view = await getTuningSet(reviewerB.acting, t.id);
		expect(view.tuningSet.onApprovedRevision).toBe(false);
		expect(view.allowed.approve).toBe(false);
		await expect(approveTuningSet(reviewerB.acting, t.id, {})).rejects.toBeInstanceOf(WorkflowConflict);
	});

	it('a failure after the save rolls everything back; discard ends it; withdrawing the model withdraws its tuning sets', async () => {
		const m = await approvedModel('ts4');
		const t = await saveTuningDraft(author.acting, m.model.id, settings());
		await submitTuningSet(author.acting, t.id);
		const audits = await AuditEvent.count();
		await expect(approveTuningSet(reviewerA.acting, t.id, {}, { onStep: (s) => { if (s === 'audit_recorded') throw new Error('crash'); } })).rejects.toThrow('crash');
		expect((await TuningSet.findByPk(t.id))?.state).toBe('in_review');
		expect(await AuditEvent.count()).toBe(audits);

		const d = await saveTuningDraft(coEditor.acting, m.model.id, settings({ loopTag: 'TIC-7199' }));
		await expect(discardTuningSet(author.acting, d.id)).rejects.toBeInstanceOf(PermissionDenied);
		expect((await discardTuningSet(coEditor.acting, d.id)).state).toBe('withdrawn');
		expect((await openTuningSets(author.acting, m.model.id)).map((x) => x.id)).toEqual([t.id]);

		await withdrawModel(reviewerA.acting, m.model.id, { reason: 'Heater replaced.' });
		const states = await sequelize().query<{ state: string }>('SELECT state FROM tuning_sets WHERE model_id = :id', {
			type: QueryTypes.SELECT,
			replacements: { id: m.model.id }
		});
		expect(states.map((s) => s.state).sort()).toEqual(['withdrawn', 'withdrawn']);
		await expect(approveTuningSet(reviewerB.acting, t.id, {})).rejects.toThrow(/withdrawn/);
	});
});
