/**
 * Plant-model revisions through the review workflow: create a model with its first draft, start a
 * new draft from the approved revision, edit a draft (optimistic locking on `version`), submit,
 * approve, send back, discard, withdraw a model, revalidate an unchanged model; and the reads the
 * review pages need (one revision with what the reader may do next, the review queue, the history
 * and the comparison of two revisions).
 *
 * Every write is ONE transaction holding the change, its audit event(s) (`recordAudit`) and the
 * notification rows of the mail outbox; rows are locked model first, then revision, so concurrent
 * writers queue instead of interleaving. Every transition is decided by `decide()` of the workflow
 * state machine; refusals are typed errors: PermissionDenied (403), WorkflowConflict and
 * ConflictError (409), InvalidInput (422, naming the field), NotFound (404).
 * Returns plain DTOs. Relative imports only.
 */
import { OptimisticLockError, Op, QueryTypes, UniqueConstraintError, type InferCreationAttributes, type Transaction } from 'sequelize';
import { sequelize } from './db/connection';
import { Area, Asset, Attachment, AuditEvent, ModelRevision, PlantModel, RevisionContributor, User, initModels } from './db/models';
import { recordAudit } from './audit';
import { assertCan, can } from '../auth/roles';
import { InvalidInput, NotFound } from './errors';
import { decide, OPEN_STATES, TRANSITIONS, type Transition, type WorkflowState } from '../workflow/state-machine';
import { largeChanges, type ChangeSnapshot, type LargeChange } from '../workflow/change-size';
import { parametersForForm, toStoredModel, type OperatingPoint, type SignalSpan, type StoredParameters } from '../workflow/model-values';
import { compareRevisions, type ComparableRevision, type RevisionComparison } from '../workflow/revision-diff';
import type { ModelCreateInput, RevisionInput, StructureValue } from '../schemas/revision';
import { ConflictError, WorkflowConflict, auditActor, enforce, isoOrNull, recordReviewDecision, step, utcToday, type Acting, type WriteOptions } from './workflow-common';
import { activeReviewers, enqueueMail, modelLink, recipientById } from './mail/outbox';
import { reviewRequestedMail } from './mail/templates';

/** The typed errors and options of the workflow writes, re-exported for routes. */
export { ConflictError, WorkflowConflict, type Acting, type WriteOptions } from './workflow-common';

// ── DTOs ─────────────────────────────────────────────────────────────────────────────────────

/** A person as the workflow shows them. */
export interface PersonRef {
	id: number;
	name: string;
}

/** One revision in full. Times in seconds, ωn in rad/s; dates YYYY-MM-DD; timestamps ISO 8601 UTC. */
export interface WorkflowRevisionDto {
	id: number;
	modelId: number;
	no: number;
	state: WorkflowState;
	structure: StructureValue;
	/** As stored: k (IPDT: per s), tau, tau2, theta in s, zeta, wn in rad/s; rational num/den. */
	parameters: StoredParameters;
	num: number[];
	den: number[];
	delaySeconds: number;
	gain: number | null;
	timeConstantSeconds: number | null;
	timeUnit: 's' | 'min';
	mv: SignalSpan;
	pv: SignalSpan;
	operatingPoint: OperatingPoint;
	provenance: {
		method: string;
		testDate: string | null;
		dataAttachmentId: number | null;
		fitR2: number | null;
		fitRmse: number | null;
		validRange: string | null;
		revalidateBy: string | null;
	};
	changeSummary: string | null;
	reviewComment: string | null;
	author: PersonRef;
	reviewer: PersonRef | null;
	/** Everyone who saved this revision (the author included). */
	contributors: PersonRef[];
	/** The approved revision it started from (null for a model's first revision). */
	baseRevisionId: number | null;
	isRevalidation: boolean;
	createdAt: string;
	updatedAt: string;
	submittedAt: string | null;
	reviewedAt: string | null;
	approvedAt: string | null;
	/** Optimistic-lock version: send it back with an edit. */
	version: number;
}

/** A model as the workflow shows it. */
export interface WorkflowModelDto {
	id: number;
	title: string;
	status: 'draft' | 'active' | 'withdrawn';
	approvedRevisionId: number | null;
	asset: { id: number; tag: string; name: string };
}

/** Transitions the reader may perform on this revision now (from `decide`, the rule the server applies). */
export type AllowedTransitions = Record<Transition, boolean>;

/** One revision with its model, what the reader may do, and how it compares with the approved one. */
export interface RevisionView {
	model: WorkflowModelDto;
	revision: WorkflowRevisionDto;
	allowed: AllowedTransitions;
	/** Large changes against the current approved revision (approval then needs a comment). */
	largeChanges: LargeChange[];
	/** The revision as form values (times in its time unit), for the edit form. */
	formValues: RevisionInput;
}

/** What a write returns: the model and the revision it touched. */
export interface RevisionResult {
	model: WorkflowModelDto;
	revision: WorkflowRevisionDto;
}

// ── Reading rows ─────────────────────────────────────────────────────────────────────────────

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

async function names(ids: number[], transaction?: Transaction): Promise<Map<number, string>> {
	const unique = [...new Set(ids.filter((x) => Number.isInteger(x)))];
	if (unique.length === 0) return new Map();
	const rows = await User.findAll({ where: { id: unique }, attributes: ['id', 'name'], transaction });
	return new Map(rows.map((u) => [Number(u.id), u.name]));
}

async function contributorIds(revisionId: number, transaction?: Transaction): Promise<number[]> {
	const rows = await RevisionContributor.findAll({ where: { revision_id: revisionId }, attributes: ['user_id'], transaction });
	return rows.map((r) => Number(r.user_id));
}

async function addContributor(transaction: Transaction, revisionId: number, userId: number): Promise<void> {
	const existing = await RevisionContributor.findOne({ where: { revision_id: revisionId, user_id: userId }, transaction });
	if (!existing) await RevisionContributor.create({ revision_id: revisionId, user_id: userId, created_at: new Date() }, { transaction });
}

async function toRevisionDto(r: ModelRevision, transaction?: Transaction): Promise<WorkflowRevisionDto> {
	const contributors = await contributorIds(Number(r.id), transaction);
	const who = await names([Number(r.author_id), ...(r.reviewer_id ? [Number(r.reviewer_id)] : []), ...contributors], transaction);
	const ref = (id: number): PersonRef => ({ id, name: who.get(id) ?? `#${id}` });
	const values = revisionValues(r);
	return {
		...values,
		modelId: Number(r.model_id),
		provenance: { ...values.provenance, dataAttachmentId: num(r.data_attachment_id) },
		author: ref(Number(r.author_id)),
		reviewer: r.reviewer_id ? ref(Number(r.reviewer_id)) : null,
		contributors: contributors.map(ref),
		baseRevisionId: num(r.base_revision_id),
		isRevalidation: Boolean(r.is_revalidation),
		createdAt: isoOrNull(r.created_at) ?? '',
		updatedAt: isoOrNull(r.updated_at) ?? '',
		submittedAt: isoOrNull(r.submitted_at),
		reviewedAt: isoOrNull(r.reviewed_at),
		approvedAt: isoOrNull(r.approved_at),
		version: Number(r.version)
	};
}

async function toModelDto(m: PlantModel, transaction?: Transaction): Promise<WorkflowModelDto> {
	const asset = await Asset.findByPk(m.asset_id, { attributes: ['id', 'tag', 'name'], transaction });
	return {
		id: Number(m.id),
		title: m.title,
		status: m.status as WorkflowModelDto['status'],
		approvedRevisionId: num(m.approved_revision_id),
		asset: { id: Number(asset?.id ?? m.asset_id), tag: asset?.tag ?? '', name: asset?.name ?? '' }
	};
}

/** The revision as edit-form values (times in its time unit). */
export function formValuesOf(r: ModelRevision | WorkflowRevisionDto): RevisionInput {
	const isRow = r instanceof ModelRevision;
	const structure = r.structure as StructureValue;
	const unit = (isRow ? r.time_unit : r.timeUnit) === 'min' ? 'min' : 's';
	const parameters = r.parameters as StoredParameters;
	const p = parametersForForm(structure, parameters, unit);
	if (isRow) {
		return {
			structure,
			...p,
			timeUnit: unit,
			mvName: r.mv_name,
			mvUnit: r.mv_unit,
			mvMin: Number(r.mv_min),
			mvMax: Number(r.mv_max),
			pvName: r.pv_name,
			pvUnit: r.pv_unit,
			pvMin: Number(r.pv_min),
			pvMax: Number(r.pv_max),
			opMv: num(r.op_mv),
			opPv: num(r.op_pv),
			opNote: r.op_note,
			method: r.method as RevisionInput['method'],
			testDate: r.test_date,
			fitR2: num(r.fit_r2),
			fitRmse: num(r.fit_rmse),
			validRange: r.valid_range,
			revalidateBy: r.revalidate_by,
			changeSummary: r.change_summary ?? '',
			dataAttachmentId: num(r.data_attachment_id)
		};
	}
	return {
		structure,
		...p,
		timeUnit: unit,
		mvName: r.mv.name,
		mvUnit: r.mv.unit,
		mvMin: r.mv.min,
		mvMax: r.mv.max,
		pvName: r.pv.name,
		pvUnit: r.pv.unit,
		pvMin: r.pv.min,
		pvMax: r.pv.max,
		opMv: r.operatingPoint.mv,
		opPv: r.operatingPoint.pv,
		opNote: r.operatingPoint.note,
		method: r.provenance.method as RevisionInput['method'],
		testDate: r.provenance.testDate,
		fitR2: r.provenance.fitR2,
		fitRmse: r.provenance.fitRmse,
		validRange: r.provenance.validRange,
		revalidateBy: r.provenance.revalidateBy,
		changeSummary: r.changeSummary ?? '',
		dataAttachmentId: r.provenance.dataAttachmentId
	};
}

/** Column values of a revision from validated input (times converted to seconds). */
function revisionColumns(input: RevisionInput) {
	const stored = toStoredModel(input);
	return {
		structure: stored.structure,
		parameters: stored.parameters as ModelRevision['parameters'],
		num: stored.num,
		den: stored.den,
		delay_s: stored.delaySeconds,
		gain: stored.gain,
		time_constant_s: stored.timeConstantSeconds,
		time_unit: input.timeUnit,
		mv_name: input.mvName,
		mv_unit: input.mvUnit,
		mv_min: input.mvMin,
		mv_max: input.mvMax,
		pv_name: input.pvName,
		pv_unit: input.pvUnit,
		pv_min: input.pvMin,
		pv_max: input.pvMax,
		op_mv: input.opMv,
		op_pv: input.opPv,
		op_note: input.opNote,
		method: input.method,
		test_date: input.testDate,
		data_attachment_id: input.dataAttachmentId,
		fit_r2: input.fitR2,
		fit_rmse: input.fitRmse,
		valid_range: input.validRange,
		revalidate_by: input.revalidateBy,
		change_summary: input.changeSummary
	};
}

/** The columns copied when a revision starts from another one. */
const CONTENT_COLUMNS = [
	'structure',
	'parameters',
	'num',
	'den',
	'delay_s',
	'gain',
	'time_constant_s',
	'time_unit',
	'mv_name',
	'mv_unit',
	'mv_min',
	'mv_max',
	'pv_name',
	'pv_unit',
	'pv_min',
	'pv_max',
	'op_mv',
	'op_pv',
	'op_note',
	'method',
	'test_date',
	'data_attachment_id',
	'fit_r2',
	'fit_rmse',
	'valid_range',
	'revalidate_by'
] as const;

type RevisionContent = Pick<InferCreationAttributes<ModelRevision>, (typeof CONTENT_COLUMNS)[number]>;

function contentOf(r: ModelRevision): RevisionContent {
	const out: Record<string, unknown> = {};
	for (const c of CONTENT_COLUMNS) out[c] = r.get(c);
	return out as RevisionContent;
}

/** The audited snapshot of a revision: whitelisted fields only. */
function snapshot(r: ModelRevision): Record<string, unknown> {
	return {
		modelId: Number(r.model_id),
		no: Number(r.revision_no),
		state: r.state,
		...contentOf(r),
		change_summary: r.change_summary,
		review_comment: r.review_comment,
		author_id: Number(r.author_id),
		reviewer_id: r.reviewer_id === null ? null : Number(r.reviewer_id),
		base_revision_id: r.base_revision_id ?? null,
		is_revalidation: Boolean(r.is_revalidation),
		version: Number(r.version)
	};
}

function changeSnapshot(r: ModelRevision): ChangeSnapshot {
	return {
		structure: r.structure,
		parameters: r.parameters as ChangeSnapshot['parameters'],
		gain: num(r.gain),
		timeConstantSeconds: num(r.time_constant_s),
		delaySeconds: Number(r.delay_s)
	};
}

async function lockModel(transaction: Transaction, modelId: number): Promise<PlantModel> {
	const m = await PlantModel.findByPk(modelId, { transaction, lock: transaction.LOCK.UPDATE });
	if (!m) throw new NotFound('There is no model with this id.');
	return m;
}

/** Locks the revision's model, then the revision (always in this order). */
async function lockRevision(transaction: Transaction, revisionId: number): Promise<{ model: PlantModel; revision: ModelRevision }> {
	const peek = await ModelRevision.findByPk(revisionId, { attributes: ['id', 'model_id'], transaction });
	if (!peek) throw new NotFound('There is no revision with this id.');
	const model = await lockModel(transaction, Number(peek.model_id));
	const revision = await ModelRevision.findByPk(revisionId, { transaction, lock: transaction.LOCK.UPDATE });
	if (!revision) throw new NotFound('There is no revision with this id.');
	return { model, revision };
}

async function openRevisionOf(transaction: Transaction, modelId: number, exceptId?: number): Promise<ModelRevision | null> {
	return ModelRevision.findOne({
		where: { model_id: modelId, state: [...OPEN_STATES], ...(exceptId ? { id: { [Op.ne]: exceptId } } : {}) },
		order: [['revision_no', 'DESC']],
		transaction
	});
}

async function approvedOf(transaction: Transaction | undefined, model: PlantModel): Promise<ModelRevision | null> {
	return model.approved_revision_id ? ModelRevision.findByPk(model.approved_revision_id, { transaction }) : null;
}

async function nextRevisionNo(transaction: Transaction, modelId: number): Promise<number> {
	const max = (await ModelRevision.max('revision_no', { where: { model_id: modelId }, transaction })) as number | null;
	return Number(max ?? 0) + 1;
}

async function checkAttachment(transaction: Transaction, input: RevisionInput, modelId: number | null): Promise<void> {
	if (input.dataAttachmentId === null) return;
	const a = await Attachment.findByPk(input.dataAttachmentId, { transaction });
	if (!a || (modelId !== null && a.model_id !== null && Number(a.model_id) !== modelId)) {
		throw new InvalidInput('dataAttachmentId', 'Step-test data file: choose a file uploaded to this model.');
	}
}

function differing(a: RevisionInput, b: RevisionInput): string[] {
	return (Object.keys(a) as (keyof RevisionInput)[]).filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k]));
}

async function lastEditor(revisionId: number, transaction?: Transaction): Promise<PersonRef | null> {
	const ev = await AuditEvent.findOne({
		where: { entity_type: 'model_revision', entity_id: String(revisionId), action: ['revision.create', 'revision.update', 'model.create'] },
		order: [['id', 'DESC']],
		transaction
	});
	if (!ev?.actor_id) return null;
	const who = await names([Number(ev.actor_id)], transaction);
	return { id: Number(ev.actor_id), name: who.get(Number(ev.actor_id)) ?? `#${ev.actor_id}` };
}

async function editConflict(revision: ModelRevision, rejected: RevisionInput, transaction?: Transaction): Promise<ConflictError<RevisionInput>> {
	const current = formValuesOf(revision);
	const by = await lastEditor(Number(revision.id), transaction);
	return new ConflictError<RevisionInput>(
		`Someone${by ? ` (${by.name})` : ''} saved this draft after you opened it. Nothing of yours was saved: compare your version with the stored one, then save again.`,
		{ version: Number(revision.version), updatedAt: isoOrNull(revision.updated_at) ?? '', updatedBy: by, values: current },
		rejected,
		differing(current, rejected)
	);
}

// ── Writes ───────────────────────────────────────────────────────────────────────────────────

/**
 * Create a plant model with its first revision as a draft (engineers and reviewers), on an
 * existing asset or on a new one created in the given area. The author becomes the first
 * contributor. Audited: `asset.create` (if new), `model.create`.
 */
export async function createModel(acting: Acting, input: ModelCreateInput, options?: WriteOptions): Promise<RevisionResult> {
	enforce(decide('create', { role: acting.user.role, actorId: acting.user.id }));
	initModels();
	try {
		return await sequelize().transaction(async (transaction) => {
			let assetId: number;
			if ('id' in input.asset) {
				const asset = await Asset.findByPk(input.asset.id, { transaction });
				if (!asset) throw new InvalidInput('assetId', 'Asset: there is no such asset; choose one from the list.');
				assetId = Number(asset.id);
			} else {
				assertCan(acting.user.role, 'asset.create');
				const area = await Area.findByPk(input.asset.areaId, { transaction });
				if (!area) throw new InvalidInput('newAssetAreaId', 'Area of the new asset: there is no such area.');
				const asset = await Asset.create(
					{
						site_id: Number(area.site_id),
						area_id: Number(area.id),
						tag: input.asset.tag,
						kind: input.asset.kind,
						name: input.asset.name,
						description: input.asset.description
					},
					{ transaction }
				);
				assetId = Number(asset.id);
				await recordAudit(transaction, {
					...auditActor(acting),
					action: 'asset.create',
					entityType: 'asset',
					entityId: assetId,
					after: { siteId: Number(area.site_id), areaId: Number(area.id), tag: asset.tag, kind: asset.kind, name: asset.name }
				});
			}
			await checkAttachment(transaction, input.revision, null);
			const model = await PlantModel.create(
				{
					asset_id: assetId,
					title: input.title,
					status: 'draft',
					approved_revision_id: null,
					withdrawn_at: null,
					withdrawn_by: null,
					withdrawn_reason: null,
					created_by: acting.user.id
				},
				{ transaction }
			);
			const revision = await ModelRevision.create(
				{
					model_id: Number(model.id),
					revision_no: 1,
					state: 'draft',
					...revisionColumns(input.revision),
					review_comment: null,
					author_id: acting.user.id,
					reviewer_id: null,
					submitted_at: null,
					reviewed_at: null,
					approved_at: null,
					base_revision_id: null
				},
				{ transaction }
			);
			await addContributor(transaction, Number(revision.id), acting.user.id);
			await step(options, 'revision_saved');
			await recordAudit(transaction, {
				...auditActor(acting),
				action: 'model.create',
				entityType: 'plant_model',
				entityId: Number(model.id),
				after: { title: model.title, assetId, revisionId: Number(revision.id), revision: snapshot(revision) }
			});
			await step(options, 'audit_recorded');
			return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
		});
	} catch (e) {
		if (e instanceof UniqueConstraintError) {
			throw new InvalidInput('newAssetTag', 'Tag of the new asset: this tag already exists on that site; choose the existing asset instead.');
		}
		throw e;
	}
}

/**
 * Start a new draft revision of a model from its approved revision (engineers and reviewers).
 * With `input` the draft holds those values; without, a copy of the approved values (change
 * summary empty). Refused while another revision of the model is open. Audited: `revision.create`.
 */
export async function createRevision(acting: Acting, modelId: number, input: RevisionInput | null = null, options?: WriteOptions): Promise<RevisionResult> {
	initModels();
	return sequelize().transaction(async (transaction) => {
		const model = await lockModel(transaction, modelId);
		const approved = await approvedOf(transaction, model);
		const open = await openRevisionOf(transaction, modelId);
		enforce(
			decide('revise', {
				role: acting.user.role,
				actorId: acting.user.id,
				modelStatus: model.status,
				hasApprovedRevision: approved !== null,
				openRevision: open ? { no: Number(open.revision_no), state: open.state as WorkflowState } : null
			})
		);
		if (!approved) throw new WorkflowConflict('This model has no approved revision yet.');
		if (input) await checkAttachment(transaction, input, modelId);
		const revision = await ModelRevision.create(
			{
				model_id: modelId,
				revision_no: await nextRevisionNo(transaction, modelId),
				state: 'draft',
				...(input ? revisionColumns(input) : { ...contentOf(approved), change_summary: null }),
				review_comment: null,
				author_id: acting.user.id,
				reviewer_id: null,
				submitted_at: null,
				reviewed_at: null,
				approved_at: null,
				base_revision_id: Number(approved.id)
			},
			{ transaction }
		);
		await addContributor(transaction, Number(revision.id), acting.user.id);
		await step(options, 'revision_saved');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'revision.create',
			entityType: 'model_revision',
			entityId: Number(revision.id),
			after: snapshot(revision)
		});
		await step(options, 'audit_recorded');
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
	});
}

/**
 * Save an edit of a draft (or of a revision sent back, which becomes a draft again). `version` is
 * the version the editor loaded; when someone saved in between, nothing is written and a
 * ConflictError (409) carries the stored values and the rejected ones. The editor becomes a
 * contributor (and can then no longer review it). Audited: `revision.update` with before/after.
 */
export async function updateDraft(
	acting: Acting,
	revisionId: number,
	version: number,
	input: RevisionInput,
	options?: WriteOptions
): Promise<RevisionResult> {
	initModels();
	try {
		return await sequelize().transaction(async (transaction) => {
			const { model, revision } = await lockRevision(transaction, revisionId);
			enforce(
				decide('edit', {
					role: acting.user.role,
					actorId: acting.user.id,
					authorId: Number(revision.author_id),
					contributorIds: await contributorIds(revisionId, transaction),
					state: revision.state as WorkflowState,
					modelStatus: model.status
				})
			);
			if (Number(revision.version) !== version) throw await editConflict(revision, input, transaction);
			await checkAttachment(transaction, input, Number(model.id));
			const before = snapshot(revision);
			revision.set({ ...revisionColumns(input), state: 'draft' });
			await revision.save({ transaction });
			await step(options, 'revision_saved');
			await addContributor(transaction, revisionId, acting.user.id);
			await recordAudit(transaction, {
				...auditActor(acting),
				action: 'revision.update',
				entityType: 'model_revision',
				entityId: revisionId,
				before,
				after: snapshot(revision)
			});
			await step(options, 'audit_recorded');
			return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
		});
	} catch (e) {
		if (e instanceof OptimisticLockError) {
			const fresh = await ModelRevision.findByPk(revisionId);
			if (fresh) throw await editConflict(fresh, input);
		}
		throw e;
	}
}

/**
 * Submit a draft for review (its author or a contributor). With `version`, refused with a
 * ConflictError when the draft changed since the submitter saw it. Needs a change summary.
 * Notifies every active reviewer who did not write or edit it. Audited: `revision.submit`.
 */
export async function submitForReview(
	acting: Acting,
	revisionId: number,
	input: { version?: number } = {},
	options?: WriteOptions
): Promise<RevisionResult & { notified: number }> {
	initModels();
	return sequelize().transaction(async (transaction) => {
		const { model, revision } = await lockRevision(transaction, revisionId);
		const contributors = await contributorIds(revisionId, transaction);
		enforce(
			decide('submit', {
				role: acting.user.role,
				actorId: acting.user.id,
				authorId: Number(revision.author_id),
				contributorIds: contributors,
				state: revision.state as WorkflowState,
				modelStatus: model.status
			})
		);
		if (input.version !== undefined && Number(revision.version) !== input.version) {
			throw await editConflict(revision, formValuesOf(revision), transaction);
		}
		if (!revision.change_summary || revision.change_summary.trim() === '') {
			throw new InvalidInput('changeSummary', 'Change summary: describe the change before submitting it for review.');
		}
		const before = snapshot(revision);
		revision.set({ state: 'in_review', submitted_at: new Date(), reviewer_id: null, reviewed_at: null });
		await revision.save({ transaction });
		await step(options, 'revision_saved');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'revision.submit',
			entityType: 'model_revision',
			entityId: revisionId,
			before: { state: before.state, version: before.version },
			after: { state: revision.state, version: Number(revision.version) }
		});
		await step(options, 'audit_recorded');
		const facts = await revisionMailFacts(transaction, model, revision);
		const author = await recipientById(transaction, Number(revision.author_id));
		const reviewers = await activeReviewers(transaction, [Number(revision.author_id), ...contributors]);
		for (const r of reviewers) {
			await enqueueMail(transaction, {
				kind: 'review_requested',
				to: { userId: r.id, address: r.email },
				entity: { type: 'model_revision', id: revisionId },
				content: reviewRequestedMail({
					...facts,
					recipientName: r.name,
					authorName: author?.name ?? acting.user.name,
					changeSummary: revision.change_summary
				})
			});
		}
		await step(options, 'outbox_queued');
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction), notified: reviewers.length };
	});
}

/** What a notification about a model revision names: model, asset tag, revision number, link. */
async function revisionMailFacts(transaction: Transaction, model: PlantModel, revision: ModelRevision) {
	const asset = await Asset.findByPk(model.asset_id, { transaction });
	return {
		subject: 'model' as const,
		modelTitle: model.title,
		assetTag: asset?.tag ?? '',
		revisionNo: Number(revision.revision_no),
		link: modelLink(Number(model.id))
	};
}

async function reviewDecision(
	transaction: Transaction,
	acting: Acting,
	transition: 'approve' | 'request_changes',
	revisionId: number,
	comment: string | null
) {
	const { model, revision } = await lockRevision(transaction, revisionId);
	const previous = await approvedOf(transaction, model);
	const large = previous && Number(previous.id) !== revisionId ? largeChanges(changeSnapshot(previous), changeSnapshot(revision)) : [];
	enforce(
		decide(transition, {
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: Number(revision.author_id),
			contributorIds: await contributorIds(revisionId, transaction),
			state: revision.state as WorkflowState,
			modelStatus: model.status,
			comment,
			largeChangeReasons: large.map((l) => l.message)
		})
	);
	return { model, revision, previous, large };
}

/**
 * Approve a revision in review (a reviewer who neither wrote nor edited it). A large change
 * against the current approved revision (see `largeChanges`) needs a comment. The previous
 * approved revision becomes `superseded`, the model points at this one and becomes `active`.
 * Notifies the author. Audited: `revision.approve` (and `revision.supersede`).
 */
export async function approve(
	acting: Acting,
	revisionId: number,
	input: { comment?: string | null } = {},
	options?: WriteOptions
): Promise<RevisionResult & { largeChanges: LargeChange[] }> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, revision, previous, large } = await reviewDecision(transaction, acting, 'approve', revisionId, comment);
		const now = new Date();
		const before = snapshot(revision);
		revision.set({ state: 'approved', reviewer_id: acting.user.id, reviewed_at: now, approved_at: now, review_comment: comment });
		await revision.save({ transaction });
		await step(options, 'revision_saved');
		if (previous && Number(previous.id) !== revisionId) {
			previous.set({ state: 'superseded' });
			await previous.save({ transaction });
			await recordAudit(transaction, {
				...auditActor(acting),
				action: 'revision.supersede',
				entityType: 'model_revision',
				entityId: Number(previous.id),
				before: { state: 'approved' },
				after: { state: 'superseded', supersededBy: revisionId }
			});
		}
		const modelBefore = { status: model.status, approvedRevisionId: model.approved_revision_id };
		model.set({ approved_revision_id: revisionId, status: 'active' });
		await model.save({ transaction });
		await step(options, 'model_updated');
		await recordReviewDecision(
			transaction,
			acting,
			options,
			{
				action: 'revision.approve',
				entityType: 'model_revision',
				entityId: revisionId,
				before: { state: before.state, model: modelBefore },
				after: {
					state: 'approved',
					reviewComment: comment,
					largeChanges: large.map((l) => l.message),
					model: { status: 'active', approvedRevisionId: revisionId }
				}
			},
			{
				decision: 'approved',
				kind: 'approved',
				authorId: Number(revision.author_id),
				entity: { type: 'model_revision', id: revisionId },
				reviewerName: acting.user.name,
				comment,
				facts: () => revisionMailFacts(transaction, model, revision)
			}
		);
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction), largeChanges: large };
	});
}

/**
 * Send a revision in review back to its author with a comment saying what must change (a
 * reviewer who neither wrote nor edited it). Sending back does not make the reviewer a
 * contributor. Notifies the author. Audited: `revision.request_changes`.
 */
export async function requestChanges(
	acting: Acting,
	revisionId: number,
	input: { comment: string },
	options?: WriteOptions
): Promise<RevisionResult> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, revision } = await reviewDecision(transaction, acting, 'request_changes', revisionId, comment);
		revision.set({ state: 'changes_requested', reviewer_id: acting.user.id, reviewed_at: new Date(), review_comment: comment });
		await revision.save({ transaction });
		await step(options, 'revision_saved');
		await recordReviewDecision(
			transaction,
			acting,
			options,
			{
				action: 'revision.request_changes',
				entityType: 'model_revision',
				entityId: revisionId,
				before: { state: 'in_review' },
				after: { state: 'changes_requested', reviewComment: comment }
			},
			{
				decision: 'changes_requested',
				kind: 'changes_requested',
				authorId: Number(revision.author_id),
				entity: { type: 'model_revision', id: revisionId },
				reviewerName: acting.user.name,
				comment,
				facts: () => revisionMailFacts(transaction, model, revision)
			}
		);
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
	});
}

/**
 * Discard an open revision (draft or sent back) that its author or a contributor no longer wants;
 * it ends `withdrawn`. When it is the only revision of a never-approved model, the model is
 * withdrawn with it. Audited: `revision.discard` (and `model.withdraw`).
 */
export async function discardRevision(
	acting: Acting,
	revisionId: number,
	input: { comment?: string | null } = {},
	options?: WriteOptions
): Promise<RevisionResult> {
	initModels();
	const comment = input.comment?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const { model, revision } = await lockRevision(transaction, revisionId);
		enforce(
			decide('discard', {
				role: acting.user.role,
				actorId: acting.user.id,
				authorId: Number(revision.author_id),
				contributorIds: await contributorIds(revisionId, transaction),
				state: revision.state as WorkflowState,
				modelStatus: model.status
			})
		);
		const before = revision.state;
		revision.set({ state: 'withdrawn', review_comment: comment ?? revision.review_comment });
		await revision.save({ transaction });
		await step(options, 'revision_saved');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'revision.discard',
			entityType: 'model_revision',
			entityId: revisionId,
			before: { state: before },
			after: { state: 'withdrawn', comment }
		});
		if (model.approved_revision_id === null) {
			const others = await ModelRevision.count({ where: { model_id: model.id, id: { [Op.ne]: revisionId }, state: { [Op.ne]: 'withdrawn' } }, transaction });
			if (others === 0) {
				const reason = `The only draft was discarded before approval${comment ? `: ${comment}` : '.'}`;
				model.set({ status: 'withdrawn', withdrawn_at: new Date(), withdrawn_by: acting.user.id, withdrawn_reason: reason });
				await model.save({ transaction });
				await step(options, 'model_updated');
				await recordAudit(transaction, {
					...auditActor(acting),
					action: 'model.withdraw',
					entityType: 'plant_model',
					entityId: Number(model.id),
					before: { status: 'draft' },
					after: { status: 'withdrawn', reason }
				});
			}
		}
		await step(options, 'audit_recorded');
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
	});
}

/**
 * Retire a model (reviewers and administrators, with a reason). Its open revisions and its
 * approved one end `withdrawn` (the model keeps pointing at the last approved revision, for the
 * record), and so do its tuning sets. A withdrawn model never changes again. Audited:
 * `model.withdraw`.
 */
export async function withdrawModel(acting: Acting, modelId: number, input: { reason: string }, options?: WriteOptions): Promise<WorkflowModelDto> {
	initModels();
	const reason = input.reason?.trim() || null;
	return sequelize().transaction(async (transaction) => {
		const model = await lockModel(transaction, modelId);
		enforce(decide('withdraw', { role: acting.user.role, actorId: acting.user.id, modelStatus: model.status, reason }));
		const revisionsChanged = await ModelRevision.findAll({
			where: { model_id: modelId, state: [...OPEN_STATES, 'approved'] },
			attributes: ['id', 'state'],
			transaction
		});
		await sequelize().query(
			`UPDATE model_revisions SET state = 'withdrawn', version = version + 1, updated_at = :now
			WHERE model_id = :modelId AND state IN ('draft', 'in_review', 'changes_requested', 'approved')`,
			{ transaction, replacements: { modelId, now: new Date() } }
		);
		await step(options, 'revision_saved');
		const tuning = await sequelize().query<{ id: number; state: string }>(
			`SELECT id, state FROM tuning_sets WHERE model_id = :modelId AND state IN ('draft', 'in_review', 'changes_requested', 'approved') FOR UPDATE`,
			{ transaction, replacements: { modelId }, type: QueryTypes.SELECT }
		);
		await sequelize().query(
			`UPDATE tuning_sets SET state = 'withdrawn', version = version + 1, updated_at = :now
			WHERE model_id = :modelId AND state IN ('draft', 'in_review', 'changes_requested', 'approved')`,
			{ transaction, replacements: { modelId, now: new Date() } }
		);
		const before = { status: model.status };
		model.set({ status: 'withdrawn', withdrawn_at: new Date(), withdrawn_by: acting.user.id, withdrawn_reason: reason });
		await model.save({ transaction });
		await step(options, 'model_updated');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'model.withdraw',
			entityType: 'plant_model',
			entityId: modelId,
			before: {
				...before,
				revisions: revisionsChanged.map((r) => ({ id: Number(r.id), state: r.state })),
				tuningSets: tuning.map((t) => ({ id: Number(t.id), state: t.state }))
			},
			after: { status: 'withdrawn', reason }
		});
		await step(options, 'audit_recorded');
		return toModelDto(model, transaction);
	});
}

/**
 * Re-approve an unchanged model with a new revalidate-by date (a reviewer who neither wrote nor
 * edited the approved revision). Recorded as a new revision: a copy of the approved one with the
 * new date, approved at once (`isRevalidation`), keeping the author (the responsible engineer)
 * and the contributors; the previous approved revision becomes `superseded`. The date must be
 * after today (UTC). Audited: `model.revalidate`.
 */
export async function revalidate(
	acting: Acting,
	modelId: number,
	input: { revalidateBy: string; comment?: string | null },
	options?: WriteOptions & { today?: string }
): Promise<RevisionResult> {
	initModels();
	const comment = input.comment?.trim() || null;
	const today = options?.today ?? utcToday();
	return sequelize().transaction(async (transaction) => {
		const model = await lockModel(transaction, modelId);
		const approved = await approvedOf(transaction, model);
		const contributors = approved ? await contributorIds(Number(approved.id), transaction) : [];
		enforce(
			decide('revalidate', {
				role: acting.user.role,
				actorId: acting.user.id,
				authorId: approved ? Number(approved.author_id) : null,
				contributorIds: contributors,
				modelStatus: model.status,
				hasApprovedRevision: approved !== null
			})
		);
		if (!approved) throw new WorkflowConflict('Only a model with an approved revision can be revalidated.');
		if (!(input.revalidateBy > today)) throw new InvalidInput('revalidateBy', `Revalidate by: choose a date after today (${today}).`);
		const now = new Date();
		const summary = `Revalidated unchanged: revalidate-by moved from ${approved.revalidate_by ?? 'none'} to ${input.revalidateBy}.`;
		const revision = await ModelRevision.create(
			{
				...contentOf(approved),
				model_id: modelId,
				revision_no: await nextRevisionNo(transaction, modelId),
				state: 'approved',
				revalidate_by: input.revalidateBy,
				change_summary: summary,
				review_comment: comment,
				author_id: Number(approved.author_id),
				reviewer_id: acting.user.id,
				submitted_at: now,
				reviewed_at: now,
				approved_at: now,
				base_revision_id: Number(approved.id),
				is_revalidation: true
			},
			{ transaction }
		);
		for (const id of new Set([Number(approved.author_id), ...contributors])) await addContributor(transaction, Number(revision.id), id);
		approved.set({ state: 'superseded' });
		await approved.save({ transaction });
		await step(options, 'revision_saved');
		model.set({ approved_revision_id: Number(revision.id), status: 'active' });
		await model.save({ transaction });
		await step(options, 'model_updated');
		await recordAudit(transaction, {
			...auditActor(acting),
			action: 'model.revalidate',
			entityType: 'plant_model',
			entityId: modelId,
			before: { approvedRevisionId: Number(approved.id), revalidateBy: approved.revalidate_by },
			after: { approvedRevisionId: Number(revision.id), revalidateBy: input.revalidateBy, comment }
		});
		await step(options, 'audit_recorded');
		return { model: await toModelDto(model, transaction), revision: await toRevisionDto(revision, transaction) };
	});
}

// ── Reads ────────────────────────────────────────────────────────────────────────────────────

const PUBLIC_STATES = new Set(['approved', 'superseded', 'withdrawn']);

function visible(acting: Acting, r: ModelRevision): boolean {
	if (can(acting.user.role, 'model.read_draft')) return true;
	return PUBLIC_STATES.has(r.state) && r.approved_at !== null;
}

/** What `decide` allows this person on this revision, transition by transition. */
function allowedOn(acting: Acting, model: PlantModel, revision: ModelRevision, approved: ModelRevision | null, contributors: number[], open: ModelRevision | null, large: LargeChange[]): AllowedTransitions {
	const out = {} as AllowedTransitions;
	const isApproved = approved !== null && Number(approved.id) === Number(revision.id);
	for (const t of TRANSITIONS) {
		const ctx = {
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: t === 'revalidate' ? (approved ? Number(approved.author_id) : null) : Number(revision.author_id),
			contributorIds: contributors,
			state: revision.state as WorkflowState,
			modelStatus: model.status,
			hasApprovedRevision: approved !== null,
			openRevision: open ? { no: Number(open.revision_no), state: open.state as WorkflowState } : null,
			// Inputs the reader has not typed yet do not hide a control.
			comment: 'x',
			reason: 'x',
			largeChangeReasons: large.map((l) => l.message)
		};
		const d = decide(t, ctx);
		out[t] = d.ok && (t !== 'revalidate' || isApproved) && (t !== 'revise' || isApproved) && t !== 'create';
	}
	return out;
}

/**
 * One revision with its model, the transitions the reader may perform, the large changes against
 * the approved revision, and its values for the edit form. Viewers see approved (and superseded)
 * revisions only; anything else is NotFound to them.
 */
export async function getRevision(acting: Acting, revisionId: number): Promise<RevisionView> {
	assertCan(acting.user.role, 'model.read');
	initModels();
	const revision = await ModelRevision.findByPk(revisionId);
	if (!revision || !visible(acting, revision)) throw new NotFound('There is no revision with this id.');
	const model = await PlantModel.findByPk(revision.model_id);
	if (!model) throw new NotFound('There is no revision with this id.');
	const approved = await approvedOf(undefined, model);
	const contributors = await contributorIds(revisionId);
	const open = await ModelRevision.findOne({ where: { model_id: model.id, state: [...OPEN_STATES] } });
	const large = approved && Number(approved.id) !== revisionId ? largeChanges(changeSnapshot(approved), changeSnapshot(revision)) : [];
	return {
		model: await toModelDto(model),
		revision: await toRevisionDto(revision),
		allowed: allowedOn(acting, model, revision, approved, contributors, open, large),
		largeChanges: large,
		formValues: formValuesOf(revision)
	};
}

/**
 * Values to pre-fill the "new revision" form: the approved revision's values (times in its unit)
 * with an empty change summary. Refused (409) while a revision is open or when there is no
 * approved revision.
 */
export async function revisionTemplate(acting: Acting, modelId: number): Promise<{ model: WorkflowModelDto; values: RevisionInput }> {
	initModels();
	const model = await PlantModel.findByPk(modelId);
	if (!model) throw new NotFound('There is no model with this id.');
	const approved = await approvedOf(undefined, model);
	const open = await ModelRevision.findOne({ where: { model_id: modelId, state: [...OPEN_STATES] } });
	enforce(
		decide('revise', {
			role: acting.user.role,
			actorId: acting.user.id,
			modelStatus: model.status,
			hasApprovedRevision: approved !== null,
			openRevision: open ? { no: Number(open.revision_no), state: open.state as WorkflowState } : null
		})
	);
	if (!approved) throw new WorkflowConflict('This model has no approved revision yet.');
	return { model: await toModelDto(model), values: { ...formValuesOf(approved), changeSummary: '' } };
}

/** A line of the review queue. */
export interface ReviewQueueItem {
	kind: 'model_revision' | 'tuning_set';
	/** Revision id or tuning-set id. */
	id: number;
	modelId: number;
	modelTitle: string;
	asset: { id: number; tag: string };
	site: { id: number; code: string };
	area: { id: number; code: string };
	/** Revision number (model revisions) or null (tuning sets). */
	revisionNo: number | null;
	loopTag: string | null;
	author: PersonRef;
	contributorIds: number[];
	changeSummary: string | null;
	submittedAt: string | null;
	/** Whole days since submission (UTC), 0 on the day. */
	waitingDays: number;
	/** The reader may approve or send it back (a reviewer who neither wrote nor edited it). */
	canReview: boolean;
}

/** Filters of the review queue; all optional. */
export interface ReviewQueueFilter {
	kind?: 'model_revision' | 'tuning_set';
	siteId?: number;
	areaId?: number;
	authorId?: number;
	/** Only what the reader may review. */
	reviewableOnly?: boolean;
}

/**
 * What waits for review (model revisions and tuning sets in review), oldest first, with who wrote
 * it, since when, and whether the reader may review it. Engineers, reviewers and administrators.
 */
export async function listReviewQueue(acting: Acting, filter: ReviewQueueFilter = {}, now: Date = new Date()): Promise<ReviewQueueItem[]> {
	assertCan(acting.user.role, 'model.read_draft');
	initModels();
	const where: string[] = [];
	const replacements: Record<string, unknown> = {};
	if (filter.siteId) {
		where.push('a.site_id = :siteId');
		replacements.siteId = filter.siteId;
	}
	if (filter.areaId) {
		where.push('a.area_id = :areaId');
		replacements.areaId = filter.areaId;
	}
	if (filter.authorId) {
		where.push('q.author_id = :authorId');
		replacements.authorId = filter.authorId;
	}
	const parts: string[] = [];
	if (filter.kind !== 'tuning_set') {
		parts.push(`SELECT 'model_revision' AS kind, r.id, r.model_id, r.revision_no, NULL AS loop_tag, r.author_id, r.change_summary, r.submitted_at
			FROM model_revisions r WHERE r.state = 'in_review'`);
	}
	if (filter.kind !== 'model_revision') {
		parts.push(`SELECT 'tuning_set' AS kind, t.id, t.model_id, NULL AS revision_no, t.loop_tag, t.author_id, t.notes AS change_summary, t.submitted_at
			FROM tuning_sets t WHERE t.state = 'in_review'`);
	}
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT q.*, pm.title, a.id AS asset_id, a.tag, s.id AS site_id, s.code AS site_code, ar.id AS area_id, ar.code AS area_code, u.name AS author_name
		FROM (${parts.join(' UNION ALL ')}) q
		JOIN plant_models pm ON pm.id = q.model_id
		JOIN assets a ON a.id = pm.asset_id
		JOIN sites s ON s.id = a.site_id
		JOIN areas ar ON ar.id = a.area_id
		JOIN users u ON u.id = q.author_id
		WHERE pm.status <> 'withdrawn' ${where.length ? `AND ${where.join(' AND ')}` : ''}
		ORDER BY q.submitted_at ASC, q.id ASC`,
		{ type: QueryTypes.SELECT, replacements }
	);
	const revIds = rows.filter((r) => r.kind === 'model_revision').map((r) => Number(r.id));
	const tsIds = rows.filter((r) => r.kind === 'tuning_set').map((r) => Number(r.id));
	const contributors = new Map<string, number[]>();
	if (revIds.length) {
		for (const c of await RevisionContributor.findAll({ where: { revision_id: revIds } })) {
			const k = `model_revision:${c.revision_id}`;
			contributors.set(k, [...(contributors.get(k) ?? []), Number(c.user_id)]);
		}
	}
	if (tsIds.length) {
		const cs = await sequelize().query<{ tuning_set_id: number; user_id: number }>(
			'SELECT tuning_set_id, user_id FROM tuning_set_contributors WHERE tuning_set_id IN (:ids)',
			{ type: QueryTypes.SELECT, replacements: { ids: tsIds } }
		);
		for (const c of cs) {
			const k = `tuning_set:${c.tuning_set_id}`;
			contributors.set(k, [...(contributors.get(k) ?? []), Number(c.user_id)]);
		}
	}
	const items = rows.map((r): ReviewQueueItem => {
		const kind = r.kind as ReviewQueueItem['kind'];
		const cids = contributors.get(`${kind}:${Number(r.id)}`) ?? [];
		const submittedAt = isoOrNull(r.submitted_at as string | Date | null);
		const d = decide('approve', {
			subject: kind === 'model_revision' ? 'model' : 'tuning_set',
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: Number(r.author_id),
			contributorIds: cids,
			state: 'in_review',
			comment: 'x'
		});
		return {
			kind,
			id: Number(r.id),
			modelId: Number(r.model_id),
			modelTitle: String(r.title),
			asset: { id: Number(r.asset_id), tag: String(r.tag) },
			site: { id: Number(r.site_id), code: String(r.site_code) },
			area: { id: Number(r.area_id), code: String(r.area_code) },
			revisionNo: r.revision_no === null ? null : Number(r.revision_no),
			loopTag: r.loop_tag === null ? null : String(r.loop_tag),
			author: { id: Number(r.author_id), name: String(r.author_name) },
			contributorIds: cids,
			changeSummary: r.change_summary === null ? null : String(r.change_summary),
			submittedAt,
			waitingDays: submittedAt ? Math.max(0, Math.floor((now.getTime() - Date.parse(submittedAt)) / 86_400_000)) : 0,
			canReview: d.ok
		};
	});
	return filter.reviewableOnly ? items.filter((i) => i.canReview) : items;
}

/** Counts for the navigation: everything waiting, and what the reader may review. */
export async function reviewQueueCounts(acting: Acting): Promise<{ waiting: number; forYou: number }> {
	if (!can(acting.user.role, 'model.read_draft')) return { waiting: 0, forYou: 0 };
	const items = await listReviewQueue(acting);
	return { waiting: items.length, forYou: items.filter((i) => i.canReview).length };
}

/** A line of a model's history. */
export interface HistoryItem {
	id: number;
	no: number;
	state: WorkflowState;
	structure: string;
	author: PersonRef;
	reviewer: PersonRef | null;
	contributors: PersonRef[];
	createdAt: string;
	submittedAt: string | null;
	reviewedAt: string | null;
	approvedAt: string | null;
	changeSummary: string | null;
	reviewComment: string | null;
	revalidateBy: string | null;
	isRevalidation: boolean;
	baseRevisionId: number | null;
}

/**
 * Every revision of a model, newest first, with author, reviewer, contributors, dates and
 * comments. Viewers see approved and superseded revisions only (NotFound for a never-approved
 * model).
 */
export async function getHistory(acting: Acting, modelId: number): Promise<{ model: WorkflowModelDto; revisions: HistoryItem[] }> {
	assertCan(acting.user.role, 'model.read');
	initModels();
	const model = await PlantModel.findByPk(modelId);
	const drafts = can(acting.user.role, 'model.read_draft');
	if (!model || (!drafts && model.approved_revision_id === null)) throw new NotFound('There is no model with this id.');
	const rows = await ModelRevision.findAll({ where: { model_id: modelId }, order: [['revision_no', 'DESC']] });
	const shown = rows.filter((r) => visible(acting, r));
	const ids = shown.map((r) => Number(r.id));
	const cons = ids.length ? await RevisionContributor.findAll({ where: { revision_id: ids } }) : [];
	const byRev = new Map<number, number[]>();
	for (const c of cons) byRev.set(Number(c.revision_id), [...(byRev.get(Number(c.revision_id)) ?? []), Number(c.user_id)]);
	const who = await names([...shown.flatMap((r) => [Number(r.author_id), Number(r.reviewer_id ?? 0)]), ...cons.map((c) => Number(c.user_id))]);
	const ref = (id: number): PersonRef => ({ id, name: who.get(id) ?? `#${id}` });
	return {
		model: await toModelDto(model),
		revisions: shown.map((r) => ({
			id: Number(r.id),
			no: Number(r.revision_no),
			state: r.state as WorkflowState,
			structure: r.structure,
			author: ref(Number(r.author_id)),
			reviewer: r.reviewer_id ? ref(Number(r.reviewer_id)) : null,
			contributors: (byRev.get(Number(r.id)) ?? []).map(ref),
			createdAt: isoOrNull(r.created_at) ?? '',
			submittedAt: isoOrNull(r.submitted_at),
			reviewedAt: isoOrNull(r.reviewed_at),
			approvedAt: isoOrNull(r.approved_at),
			changeSummary: r.change_summary,
			reviewComment: r.review_comment,
			revalidateBy: r.revalidate_by,
			isRevalidation: Boolean(r.is_revalidation),
			baseRevisionId: num(r.base_revision_id)
		}))
	};
}

/** A stored revision's values (the comparison's view of it, and the core of its DTO). */
function revisionValues(r: ModelRevision) {
	return {
		id: Number(r.id),
		no: Number(r.revision_no),
		state: r.state as WorkflowState,
		structure: r.structure as StructureValue,
		parameters: r.parameters as StoredParameters,
		num: r.num,
		den: r.den,
		delaySeconds: Number(r.delay_s),
		gain: num(r.gain),
		timeConstantSeconds: num(r.time_constant_s),
		timeUnit: (r.time_unit === 'min' ? 'min' : 's') as 's' | 'min',
		mv: { name: r.mv_name, unit: r.mv_unit, min: Number(r.mv_min), max: Number(r.mv_max) },
		pv: { name: r.pv_name, unit: r.pv_unit, min: Number(r.pv_min), max: Number(r.pv_max) },
		operatingPoint: { mv: num(r.op_mv), pv: num(r.op_pv), note: r.op_note },
		provenance: {
			method: r.method,
			testDate: r.test_date,
			fitR2: num(r.fit_r2),
			fitRmse: num(r.fit_rmse),
			validRange: r.valid_range,
			revalidateBy: r.revalidate_by
		},
		changeSummary: r.change_summary,
		reviewComment: r.review_comment
	} satisfies ComparableRevision;
}

/**
 * Compare two revisions of the same model (`fromRevisionId` is shown as the old side):
 * parameters side by side with the change in %, other fields, text diffs of the change
 * summaries, review comments, valid range and operating-point notes, the large changes, and both
 * transfer functions for overlaying the step responses. InvalidInput when they belong to
 * different models.
 */
export async function diffRevisions(acting: Acting, fromRevisionId: number, toRevisionId: number): Promise<RevisionComparison> {
	assertCan(acting.user.role, 'model.read');
	initModels();
	const [a, b] = await Promise.all([ModelRevision.findByPk(fromRevisionId), ModelRevision.findByPk(toRevisionId)]);
	if (!a || !visible(acting, a)) throw new NotFound('There is no revision with this id.');
	if (!b || !visible(acting, b)) throw new NotFound('There is no revision with this id.');
	if (Number(a.model_id) !== Number(b.model_id)) throw new InvalidInput('to', 'Both revisions must belong to the same model.');
	return compareRevisions(revisionValues(a), revisionValues(b));
}
