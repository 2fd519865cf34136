/**
 * Tuning sets through the review workflow: save a draft from the bench against the model's
 * approved revision for a loop tag (rule, rule parameter, predicted metrics), edit it (optimistic
 * locking on `version`), submit, approve, send back, discard — the same transitions and four-eyes
 * rule as model revisions, decided by the same `decide()`. Approving a tuning set supersedes the
 * previously approved one of the same model and loop tag; a tuning set whose model revision is no
 * longer the approved one cannot be approved (save it again against the current model).
 *
 * Every write is ONE transaction with its audit event and outbox rows. Typed errors as in
 * `revisions.ts`. Relative imports only.
 */
import { OptimisticLockError, Op, QueryTypes, type Transaction } from 'sequelize';
import { sequelize } from './db/connection';
import { Asset, AuditEvent, ModelRevision, PlantModel, TuningSet, User, initModels } from './db/models';
import { TuningSetContributor } from './db/models-workflow';
import { recordAudit } from './audit';
import { assertCan, can } from '../auth/roles';
import { NotFound } from './errors';
import { decide, TRANSITIONS, type WorkflowState } from '../workflow/state-machine';
import type { TuningSetInput } from '../schemas/tuning-set';
import { ConflictError, WorkflowConflict, auditActor, enforce, isoOrNull, recordReviewDecision, step, type Acting, type WriteOptions } from './workflow-common';
import { activeReviewers, enqueueMail, modelLink, recipientById } from './mail/outbox';
import { reviewRequestedMail } from './mail/templates';
import type { AllowedTransitions, PersonRef } from './revisions';

/** A tuning set in full. Times in seconds; timestamps ISO 8601 UTC. */
export interface WorkflowTuningSetDto {
	id: number;
	modelId: number;
	modelRevisionId: number;
	revisionNo: number;
	/** The model revision it was computed on is still the approved one. */
	onApprovedRevision: boolean;
	loopTag: string;
	state: WorkflowState;
	controllerType: 'P' | 'PI' | 'PD' | 'PID';
	form: 'ideal' | 'series' | 'parallel';
	kp: number;
	tiSeconds: number | null;
	tdSeconds: number | null;
	filterN: number | null;
	weightB: number | null;
	weightC: number | null;
	rule: string | null;
	ruleParameter: number | null;
	predicted: Record<string, number | null> | null;
	notes: string | null;
	reviewComment: string | null;
	author: PersonRef;
	reviewer: PersonRef | null;
	contributors: PersonRef[];
	createdAt: string;
	updatedAt: string;
	submittedAt: string | null;
	reviewedAt: string | null;
	approvedAt: string | null;
	version: number;
}

/** A tuning set with what the reader may do and its edit-form values (times in s). */
export interface TuningSetView {
	tuningSet: WorkflowTuningSetDto;
	model: { id: number; title: string; status: string; assetTag: string };
	allowed: AllowedTransitions;
	formValues: TuningSetInput;
}

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

async function contributorIds(id: number, transaction?: Transaction): Promise<number[]> {
	const rows = await TuningSetContributor.findAll({ where: { tuning_set_id: id }, attributes: ['user_id'], transaction });
	return rows.map((r) => Number(r.user_id));
}

async function addContributor(transaction: Transaction, id: number, userId: number): Promise<void> {
	const existing = await TuningSetContributor.findOne({ where: { tuning_set_id: id, user_id: userId }, transaction });
	if (!existing) await TuningSetContributor.create({ tuning_set_id: id, user_id: userId, created_at: new Date() }, { transaction });
}

async function toDto(t: TuningSet, transaction?: Transaction): Promise<WorkflowTuningSetDto> {
	const contributors = await contributorIds(Number(t.id), transaction);
	const ids = [...new Set([Number(t.author_id), ...(t.reviewer_id ? [Number(t.reviewer_id)] : []), ...contributors])];
	const users = await User.findAll({ where: { id: ids }, attributes: ['id', 'name'], transaction });
	const who = new Map(users.map((u) => [Number(u.id), u.name]));
	const ref = (id: number): PersonRef => ({ id, name: who.get(id) ?? `#${id}` });
	const [revision, model] = await Promise.all([
		ModelRevision.findByPk(t.model_revision_id, { attributes: ['id', 'revision_no'], transaction }),
		PlantModel.findByPk(t.model_id, { attributes: ['id', 'approved_revision_id', 'status'], transaction })
	]);
	return {
		id: Number(t.id),
		modelId: Number(t.model_id),
		modelRevisionId: Number(t.model_revision_id),
		revisionNo: Number(revision?.revision_no ?? 0),
		onApprovedRevision: model !== null && model.status === 'active' && Number(model.approved_revision_id) === Number(t.model_revision_id),
		loopTag: t.loop_tag,
		state: t.state as WorkflowState,
		controllerType: t.controller_type,
		form: t.form,
		kp: Number(t.kp),
		tiSeconds: num(t.ti_s),
		tdSeconds: num(t.td_s),
		filterN: num(t.filter_n),
		weightB: num(t.weight_b),
		weightC: num(t.weight_c),
		rule: t.rule,
		ruleParameter: num(t.rule_parameter),
		predicted: (t.predicted as Record<string, number | null> | null) ?? null,
		notes: t.notes,
		reviewComment: t.review_comment,
		author: ref(Number(t.author_id)),
		reviewer: t.reviewer_id ? ref(Number(t.reviewer_id)) : null,
		contributors: contributors.map(ref),
		createdAt: isoOrNull(t.created_at) ?? '',
		updatedAt: isoOrNull(t.updated_at) ?? '',
		submittedAt: isoOrNull(t.submitted_at),
		reviewedAt: isoOrNull(t.reviewed_at),
		approvedAt: isoOrNull(t.approved_at),
		version: Number(t.version)
	};
}

/** The stored tuning set as form values (times in seconds). */
export function tuningFormValuesOf(t: TuningSet): TuningSetInput {
	return {
		loopTag: t.loop_tag,
		controllerType: t.controller_type,
		form: t.form,
		kp: Number(t.kp),
		tiSeconds: num(t.ti_s),
		tdSeconds: num(t.td_s),
		filterN: num(t.filter_n),
		weightB: num(t.weight_b),
		weightC: num(t.weight_c),
		rule: t.rule,
		ruleParameter: num(t.rule_parameter),
		predicted: (t.predicted as Record<string, number | null> | null) ?? null,
		notes: t.notes
	};
}

function columns(input: TuningSetInput) {
	return {
		loop_tag: input.loopTag,
		controller_type: input.controllerType,
		form: input.form,
		kp: input.kp,
		ti_s: input.tiSeconds,
		td_s: input.tdSeconds,
		filter_n: input.filterN,
		weight_b: input.weightB,
		weight_c: input.weightC,
		rule: input.rule,
		rule_parameter: input.ruleParameter,
		predicted: input.predicted,
		notes: input.notes
	};
}

function snapshot(t: TuningSet): Record<string, unknown> {
	return {
		modelId: Number(t.model_id),
		modelRevisionId: Number(t.model_revision_id),
		state: t.state,
		...tuningFormValuesOf(t),
		reviewComment: t.review_comment,
		authorId: Number(t.author_id),
		reviewerId: t.reviewer_id === null ? null : Number(t.reviewer_id),
		version: Number(t.version)
	};
}

/** Locks the tuning set's model, then the tuning set. */
async function lockTuningSet(transaction: Transaction, id: number): Promise<{ model: PlantModel; tuningSet: TuningSet }> {
	const peek = await TuningSet.findByPk(id, { attributes: ['id', 'model_id'], transaction });
	if (!peek) throw new NotFound('There is no tuning set with this id.');
	const model = await PlantModel.findByPk(peek.model_id, { transaction, lock: transaction.LOCK.UPDATE });
	if (!model) throw new NotFound('There is no tuning set with this id.');
	const tuningSet = await TuningSet.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
	if (!tuningSet) throw new NotFound('There is no tuning set with this id.');
	return { model, tuningSet };
}

async function lastEditor(id: number, transaction?: Transaction): Promise<PersonRef | null> {
	const ev = await AuditEvent.findOne({
		where: { entity_type: 'tuning_set', entity_id: String(id), action: ['tuning_set.create', 'tuning_set.update'] },
		order: [['id', 'DESC']],
		transaction
	});
	if (!ev?.actor_id) return null;
	const u = await User.findByPk(ev.actor_id, { attributes: ['id', 'name'], transaction });
	return { id: Number(ev.actor_id), name: u?.name ?? `#${ev.actor_id}` };
}

async function editConflict(t: TuningSet, rejected: TuningSetInput, transaction?: Transaction): Promise<ConflictError<TuningSetInput>> {
	const current = tuningFormValuesOf(t);
	const by = await lastEditor(Number(t.id), transaction);
	const differing = (Object.keys(current) as (keyof TuningSetInput)[]).filter((k) => JSON.stringify(current[k]) !== JSON.stringify(rejected[k]));
	return new ConflictError<TuningSetInput>(
		`Someone${by ? ` (${by.name})` : ''} saved this tuning set after you opened it. Nothing of yours was saved: compare both versions, then save again.`,
		{ version: Number(t.version), updatedAt: isoOrNull(t.updated_at) ?? '', updatedBy: by, values: current },
		rejected,
		differing
	);
}

async function mailFacts(transaction: Transaction, model: PlantModel, t: TuningSet) {
	const asset = await Asset.findByPk(model.asset_id, { transaction });
	return {
		subject: 'tuning_set' as const,
		modelTitle: model.title,
		assetTag: asset?.tag ?? '',
		revisionNo: Number(t.id),
		loopTag: t.loop_tag,
		link: modelLink(Number(model.id))
	};
}

/**
 * Save the bench's settings as a draft tuning set of `modelId`, against its approved revision
 * (engineers and reviewers). Audited: `tuning_set.create`.
 */
export async function saveTuningDraft(acting: Acting, modelId: number, input: TuningSetInput, options?: WriteOptions): Promise<WorkflowTuningSetDto> {
	initModels();
	return sequelize().transaction(async (transaction) => {
		const model = await PlantModel.findByPk(modelId, { transaction, lock: transaction.LOCK.UPDATE });
		if (!model) throw new NotFound('There is no model with this id.');
		enforce(
			decide('create', {
				subject: 'tuning_set',
				role: acting.user.role,
				actorId: acting.user.id,
				modelStatus: model.status,
				hasApprovedRevision: model.approved_revision_id !== null
			})
		);
		const t = await TuningSet.create(
			{
				model_id: modelId,
				model_revision_id: Number(model.approved_revision_id),
				state: 'draft',
				...columns(input),
				review_comment: null,
				author_id: acting.user.id,
				reviewer_id: null,
				submitted_at: null,
				reviewed_at: null,
				approved_at: null
			},
			{ transaction }
		);
		await addContributor(transaction, Number(t.id), acting.user.id);
		await step(options, 'revision_saved');
		await recordAudit(transaction, { ...auditActor(acting), action: 'tuning_set.create', entityType: 'tuning_set', entityId: Number(t.id), after: snapshot(t) });
		await step(options, 'audit_recorded');
		return toDto(t, transaction);
	});
}

/**
 * Save an edit of a draft tuning set (or one sent back, which becomes a draft again); `version`
 * as loaded. A stale version → ConflictError (409) with both versions, nothing written. The
 * editor becomes a contributor. Audited: `tuning_set.update`.
 */
export async function updateTuningDraft(
	acting: Acting,
	id: number,
	version: number,
	input: TuningSetInput,
	options?: WriteOptions
): Promise<WorkflowTuningSetDto> {
	initModels();
	try {
		return await sequelize().transaction(async (transaction) => {
			const { model, tuningSet: t } = await lockTuningSet(transaction, id);
			enforce(
				decide('edit', {
					subject: 'tuning_set',
					role: acting.user.role,
					actorId: acting.user.id,
					authorId: Number(t.author_id),
					contributorIds: await contributorIds(id, transaction),
					state: t.state as WorkflowState,
					modelStatus: model.status
				})
			);
			if (Number(t.version) !== version) throw await editConflict(t, input, transaction);
			const before = snapshot(t);
			t.set({ ...columns(input), state: 'draft' });
			await t.save({ transaction });
			await step(options, 'revision_saved');
			await addContributor(transaction, id, acting.user.id);
			await recordAudit(transaction, { ...auditActor(acting), action: 'tuning_set.update', entityType: 'tuning_set', entityId: id, before, after: snapshot(t) });
			await step(options, 'audit_recorded');
			return toDto(t, transaction);
		});
	} catch (e) {
		if (e instanceof OptimisticLockError) {
			const fresh = await TuningSet.findByPk(id);
			if (fresh) throw await editConflict(fresh, input);
		}
		throw e;
	}
}

/**
 * Submit a draft tuning set for review (author or contributor); notifies every active reviewer
 * who did not write or edit it. Audited: `tuning_set.submit`.
 */
export async function submitTuningSet(
	acting: Acting,
	id: number,
	input: { version?: number } = {},
	options?: WriteOptions
): Promise<WorkflowTuningSetDto & { notified: number }> {
	initModels();
	return sequelize().transaction(async (transaction) => {
		const { model, tuningSet: t } = await lockTuningSet(transaction, id);
		const contributors = await contributorIds(id, transaction);
		enforce(
			decide('submit', {
				subject: 'tuning_set',
				role: acting.user.role,
				actorId: acting.user.id,
				authorId: Number(t.author_id),
				contributorIds: contributors,
				state: t.state as WorkflowState,
				modelStatus: model.status
			})
		);
		if (input.version !== undefined && Number(t.version) !== input.version) throw await editConflict(t, tuningFormValuesOf(t), transaction);
		t.set({ state: 'in_review', submitted_at: new Date(), reviewer_id: null, reviewed_at: null });
		await t.save({ transaction });
		await step(options, 'revision_saved');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'tuning_set.submit',
			entityType: 'tuning_set',
			entityId: id,
			before: { state: 'draft' },
			after: { state: 'in_review' }
		});
		await step(options, 'audit_recorded');
		const facts = await mailFacts(transaction, model, t);
		const author = await recipientById(transaction, Number(t.author_id));
		const reviewers = await activeReviewers(transaction, [Number(t.author_id), ...contributors]);
		for (const r of reviewers) {
			await enqueueMail(transaction, {
				kind: 'tuning_review_requested',
				to: { userId: r.id, address: r.email },
				entity: { type: 'tuning_set', id },
				content: reviewRequestedMail({ ...facts, recipientName: r.name, authorName: author?.name ?? acting.user.name, changeSummary: t.notes })
			});
		}
		await step(options, 'outbox_queued');
		return { ...(await toDto(t, transaction)), notified: reviewers.length };
	});
}

/**
 * The common end of a review decision on a tuning set, after its state is saved: the audit event
 * (in_review → the decision, with the comment and `extra`), then the mail to the author.
 */
async function closeReview(
	transaction: Transaction,
	acting: Acting,
	options: WriteOptions | undefined,
	model: PlantModel,
	t: TuningSet,
	decision: 'approved' | 'changes_requested',
	comment: string | null,
	extra: Record<string, unknown> = {}
): Promise<WorkflowTuningSetDto> {
	const id = Number(t.id);
	await recordReviewDecision(
		transaction,
		acting,
		options,
		{
			action: decision === 'approved' ? 'tuning_set.approve' : 'tuning_set.request_changes',
			entityType: 'tuning_set',
			entityId: id,
			before: { state: 'in_review' },
			after: { state: decision, reviewComment: comment, ...extra }
		},
		{
			decision,
			kind: decision === 'approved' ? 'tuning_approved' : 'tuning_changes_requested',
			authorId: Number(t.author_id),
			entity: { type: 'tuning_set', id },
			reviewerName: acting.user.name,
			comment,
			facts: () => mailFacts(transaction, model, t)
		}
	);
	return toDto(t, transaction);
}

async function reviewTuning(transaction: Transaction, acting: Acting, transition: 'approve' | 'request_changes', id: number, comment: string | null) {
	const { model, tuningSet: t } = await lockTuningSet(transaction, id);
	enforce(
		decide(transition, {
			subject: 'tuning_set',
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: Number(t.author_id),
			contributorIds: await contributorIds(id, transaction),
			state: t.state as WorkflowState,
			modelStatus: model.status,
			comment
		})
	);
	return { model, t };
}

/**
 * Approve a tuning set in review (a reviewer who neither wrote nor edited it). Refused (409) when
 * its model revision is no longer the approved one. The previously approved tuning set of the same
 * model and loop tag becomes `superseded`. Notifies the author. Audited: `tuning_set.approve`.
 */
export async function approveTuningSet(
	acting: Acting,
	id: number,
	input: { comment?: string | null } = {},
	options?: WriteOptions
): Promise<WorkflowTuningSetDto> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, t } = await reviewTuning(transaction, acting, 'approve', id, comment);
		if (Number(model.approved_revision_id) !== Number(t.model_revision_id)) {
			throw new WorkflowConflict('The model has a newer approved revision than the one this tuning set was computed on; send it back so it is saved again against the current model.');
		}
		const now = new Date();
		t.set({ state: 'approved', reviewer_id: acting.user.id, reviewed_at: now, approved_at: now, review_comment: comment });
		await t.save({ transaction });
		await step(options, 'revision_saved');
		const older = await TuningSet.findAll({
			where: { model_id: t.model_id, loop_tag: t.loop_tag, state: 'approved', id: { [Op.ne]: id } },
			transaction,
			lock: transaction.LOCK.UPDATE
		});
		for (const o of older) {
			o.set({ state: 'superseded' });
			await o.save({ transaction });
		}
		await step(options, 'model_updated');
		return closeReview(transaction, acting, options, model, t, 'approved', comment, { superseded: older.map((o) => Number(o.id)) });
	});
}

/**
 * Send a tuning set in review back with a comment (a reviewer who neither wrote nor edited it).
 * Notifies the author. Audited: `tuning_set.request_changes`.
 */
export async function requestTuningChanges(acting: Acting, id: number, input: { comment: string }, options?: WriteOptions): Promise<WorkflowTuningSetDto> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, t } = await reviewTuning(transaction, acting, 'request_changes', id, comment);
		t.set({ state: 'changes_requested', reviewer_id: acting.user.id, reviewed_at: new Date(), review_comment: comment });
		await t.save({ transaction });
		await step(options, 'revision_saved');
		return closeReview(transaction, acting, options, model, t, 'changes_requested', comment);
	});
}

/** Discard an open tuning set (author or contributor); it ends `withdrawn`. Audited: `tuning_set.discard`. */
export async function discardTuningSet(acting: Acting, id: number, input: { comment?: string | null } = {}, options?: WriteOptions): Promise<WorkflowTuningSetDto> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, tuningSet: t } = await lockTuningSet(transaction, id);
		enforce(
			decide('discard', {
				subject: 'tuning_set',
				role: acting.user.role,
				actorId: acting.user.id,
				authorId: Number(t.author_id),
				contributorIds: await contributorIds(id, transaction),
				state: t.state as WorkflowState,
				modelStatus: model.status
			})
		);
		const before = t.state;
		t.set({ state: 'withdrawn' });
		await t.save({ transaction });
		await step(options, 'revision_saved');
		await recordAudit(transaction, { ...auditActor(acting), action: 'tuning_set.discard', entityType: 'tuning_set', entityId: id, before: { state: before }, after: { state: 'withdrawn', comment } });
		await step(options, 'audit_recorded');
		return toDto(t, transaction);
	});
}

/**
 * One tuning set with its model, the transitions the reader may perform and its form values.
 * Viewers see approved tuning sets only (NotFound otherwise).
 */
export async function getTuningSet(acting: Acting, id: number): Promise<TuningSetView> {
	assertCan(acting.user.role, 'tuning.read');
	initModels();
	const t = await TuningSet.findByPk(id);
	if (!t || (!can(acting.user.role, 'model.read_draft') && t.state !== 'approved')) throw new NotFound('There is no tuning set with this id.');
	const model = await PlantModel.findByPk(t.model_id);
	if (!model) throw new NotFound('There is no tuning set with this id.');
	const asset = await Asset.findByPk(model.asset_id, { attributes: ['tag'] });
	const contributors = await contributorIds(id);
	const allowed = {} as AllowedTransitions;
	for (const tr of TRANSITIONS) {
		const d = decide(tr, {
			subject: 'tuning_set',
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: Number(t.author_id),
			contributorIds: contributors,
			state: t.state as WorkflowState,
			modelStatus: model.status,
			hasApprovedRevision: model.approved_revision_id !== null,
			comment: 'x',
			reason: 'x'
		});
		allowed[tr] = d.ok && ['edit', 'submit', 'approve', 'request_changes', 'discard'].includes(tr);
	}
	if (allowed.approve && Number(model.approved_revision_id) !== Number(t.model_revision_id)) allowed.approve = false;
	return {
		tuningSet: await toDto(t),
		model: { id: Number(model.id), title: model.title, status: model.status, assetTag: asset?.tag ?? '' },
		allowed,
		formValues: tuningFormValuesOf(t)
	};
}

/** Tuning sets of a model in review or open, for the model page's workflow panel (engineers and above). */
export async function openTuningSets(acting: Acting, modelId: number): Promise<WorkflowTuningSetDto[]> {
	assertCan(acting.user.role, 'model.read_draft');
	initModels();
	const rows = await sequelize().query<{ id: number }>(
		`SELECT id FROM tuning_sets WHERE model_id = :modelId AND state IN ('draft', 'in_review', 'changes_requested') ORDER BY updated_at DESC, id DESC`,
		{ type: QueryTypes.SELECT, replacements: { modelId } }
	);
	const out: WorkflowTuningSetDto[] = [];
	for (const r of rows) {
		const t = await TuningSet.findByPk(r.id);
		if (t) out.push(await toDto(t));
	}
	return out;
}
