/**
 * Plant models — the read side: one model with the revision it shows (the approved one; for
 * engineers and above, the newest when none is approved), its revision history, tuning sets and
 * notes, as plain DTOs. Visibility: viewers see models with an approved revision and approved
 * tuning sets only; anything else is "not found" to them (no leak that it exists).
 * The write side (create, revise, review) joins this module in a later step: it will add
 * functions here that take a transaction and record audit events with `recordAudit`.
 * Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { assertCan, can } from '../auth/roles';
import { NotFound } from './errors';
import { renderNoteMarkdown } from './markdown';
import type { Actor } from './register';
import { todayUtc } from '../format';
import type { OperatingPoint, SignalSpan } from '../workflow/model-values';

/** A revision as the model page shows it. Times in seconds; dates `YYYY-MM-DD`; timestamps ISO UTC. */
export interface RevisionDto {
	id: number;
	no: number;
	state: string;
	structure: string;
	/** As stored: k (integrating: per second), tau, tau2, theta in s, zeta, wn in rad/s. */
	parameters: Record<string, number>;
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
		dataFile: { filename: string; sizeBytes: number; mediaType: string } | null;
		fitR2: number | null;
		fitRmse: number | null;
		validRange: string | null;
		revalidateBy: string | null;
	};
	changeSummary: string | null;
	author: { id: number; name: string };
	reviewer: { id: number; name: string } | null;
	submittedAt: string | null;
	reviewedAt: string | null;
	approvedAt: string | null;
}

/** A line of the revision history. */
export interface RevisionListItem {
	id: number;
	no: number;
	state: string;
	authorName: string;
	reviewerName: string | null;
	createdAt: string;
	submittedAt: string | null;
	approvedAt: string | null;
	changeSummary: string | null;
}

/** A tuning set as lists show it. Times in seconds; kp as stored for its form. */
export interface TuningSetDto {
	id: number;
	modelId: number;
	modelTitle: string;
	revisionNo: number;
	loopTag: string;
	state: string;
	controllerType: string;
	form: string;
	kp: number;
	tiSeconds: number | null;
	tdSeconds: number | null;
	filterN: number | null;
	rule: string | null;
	ruleParameter: number | null;
	authorName: string;
	approvedAt: string | null;
	updatedAt: string;
}

export interface NoteDto {
	id: number;
	title: string;
	/** Sanitised HTML (Markdown + KaTeX), safe for `{@html}`. */
	html: string;
	authorName: string;
	updatedAt: string;
}

export interface ModelPageDto {
	id: number;
	title: string;
	status: 'draft' | 'active' | 'withdrawn';
	withdrawn: { at: string | null; reason: string | null } | null;
	asset: { id: number; tag: string; name: string; kind: string };
	site: { id: number; code: string; name: string };
	area: { id: number; code: string; name: string };
	/** The revision shown; `isApproved` false means a never-approved draft (engineers and above only). */
	revision: RevisionDto;
	isApproved: boolean;
	/** Id of the model's approved revision (null when none); the shown one differs when another was asked for. */
	approvedRevisionId: number | null;
	/** A newer revision waiting (draft, in review, changes requested); engineers and above only. */
	pending: { id: number; no: number; state: string; authorName: string; submittedAt: string | null } | null;
	stale: boolean;
	history: RevisionListItem[];
	tuningSets: TuningSetDto[];
	notes: NoteDto[];
	today: string;
}

const iso = (v: unknown): string | null => {
	if (v === null || v === undefined) return null;
	const d = v instanceof Date ? v : new Date(`${String(v).replace(' ', 'T')}Z`);
	return Number.isNaN(d.getTime()) ? null : d.toISOString();
};
const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));
const str = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));
function json<T>(v: unknown, fallback: T): T {
	if (v === null || v === undefined) return fallback;
	if (typeof v !== 'string') return v as T;
	try {
		return JSON.parse(v) as T;
	} catch {
		return fallback;
	}
}

const REVISION_COLUMNS = `r.id, r.revision_no, r.state, r.structure, r.parameters, r.num, r.den, r.delay_s,
	r.gain, r.time_constant_s, r.time_unit, r.mv_name, r.mv_unit, r.mv_min, r.mv_max,
	r.pv_name, r.pv_unit, r.pv_min, r.pv_max, r.op_mv, r.op_pv, r.op_note, r.method,
	DATE_FORMAT(r.test_date, '%Y-%m-%d') AS test_date,
	DATE_FORMAT(r.revalidate_by, '%Y-%m-%d') AS revalidate_by,
	r.fit_r2, r.fit_rmse, r.valid_range, r.change_summary,
	r.author_id, au.name AS author_name, r.reviewer_id, rv.name AS reviewer_name,
	r.submitted_at, r.reviewed_at, r.approved_at,
	att.filename AS data_filename, att.size_bytes AS data_size, att.media_type AS data_media_type`;

function toRevision(r: Record<string, unknown>): RevisionDto {
	return {
		id: Number(r.id),
		no: Number(r.revision_no),
		state: String(r.state),
		structure: String(r.structure),
		parameters: json<Record<string, number>>(r.parameters, {}),
		num: json<number[]>(r.num, []),
		den: json<number[]>(r.den, []),
		delaySeconds: Number(r.delay_s ?? 0),
		gain: num(r.gain),
		timeConstantSeconds: num(r.time_constant_s),
		timeUnit: r.time_unit === 'min' ? 'min' : 's',
		mv: { name: String(r.mv_name), unit: String(r.mv_unit), min: Number(r.mv_min), max: Number(r.mv_max) },
		pv: { name: String(r.pv_name), unit: String(r.pv_unit), min: Number(r.pv_min), max: Number(r.pv_max) },
		operatingPoint: { mv: num(r.op_mv), pv: num(r.op_pv), note: str(r.op_note) },
		provenance: {
			method: String(r.method),
			testDate: str(r.test_date),
			dataFile:
				r.data_filename === null || r.data_filename === undefined
					? null
					: { filename: String(r.data_filename), sizeBytes: Number(r.data_size), mediaType: String(r.data_media_type) },
			fitR2: num(r.fit_r2),
			fitRmse: num(r.fit_rmse),
			validRange: str(r.valid_range),
			revalidateBy: str(r.revalidate_by)
		},
		changeSummary: str(r.change_summary),
		author: { id: Number(r.author_id), name: String(r.author_name) },
		reviewer: r.reviewer_id === null ? null : { id: Number(r.reviewer_id), name: String(r.reviewer_name) },
		submittedAt: iso(r.submitted_at),
		reviewedAt: iso(r.reviewed_at),
		approvedAt: iso(r.approved_at)
	};
}

/** States of tuning sets a viewer may read. */
const PUBLIC_TUNING_STATES = `('approved')`;

/**
 * Tuning sets of one model or of every model of one asset, newest first. Viewers see approved
 * ones only; others see every state except withdrawn ones of withdrawn models.
 */
export async function listTuningSets(actor: Actor, where: { modelId: number } | { assetId: number }): Promise<TuningSetDto[]> {
	assertCan(actor.role, 'tuning.read');
	const drafts = can(actor.role, 'model.read_draft');
	const filter = 'modelId' in where ? 't.model_id = :id' : 'pm.asset_id = :id';
	const id = 'modelId' in where ? where.modelId : where.assetId;
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT t.id, t.model_id, pm.title AS model_title, r.revision_no, t.loop_tag, t.state, t.controller_type,
			t.form, t.kp, t.ti_s, t.td_s, t.filter_n, t.rule, t.rule_parameter, u.name AS author_name,
			t.approved_at, t.updated_at
		FROM tuning_sets t
		JOIN plant_models pm ON pm.id = t.model_id
		JOIN model_revisions r ON r.id = t.model_revision_id
		JOIN users u ON u.id = t.author_id
		WHERE ${filter} ${drafts ? '' : `AND t.state IN ${PUBLIC_TUNING_STATES} AND pm.approved_revision_id IS NOT NULL`}
		ORDER BY (t.state = 'approved') DESC, t.updated_at DESC, t.id DESC`,
		{ type: QueryTypes.SELECT, replacements: { id } }
	);
	return rows.map((t) => ({
		id: Number(t.id),
		modelId: Number(t.model_id),
		modelTitle: String(t.model_title),
		revisionNo: Number(t.revision_no),
		loopTag: String(t.loop_tag),
		state: String(t.state),
		controllerType: String(t.controller_type),
		form: String(t.form),
		kp: Number(t.kp),
		tiSeconds: num(t.ti_s),
		tdSeconds: num(t.td_s),
		filterN: num(t.filter_n),
		rule: str(t.rule),
		ruleParameter: num(t.rule_parameter),
		authorName: String(t.author_name),
		approvedAt: iso(t.approved_at),
		updatedAt: iso(t.updated_at) ?? ''
	}));
}

/**
 * Everything the read-only model page shows. NotFound when the model does not exist or is not
 * visible to the actor (a viewer asking for a never-approved model). `options.revisionId` shows
 * that revision of the model instead (engineers and above: any; viewers: approved or superseded
 * ones only; NotFound otherwise); the stale flag always follows the approved revision.
 */
export async function getModelPage(
	actor: Actor,
	modelId: number,
	today: string = todayUtc(),
	options: { revisionId?: number | null } = {}
): Promise<ModelPageDto> {
	assertCan(actor.role, 'model.read');
	const drafts = can(actor.role, 'model.read_draft');
	const db = sequelize();
	const heads = await db.query<Record<string, unknown>>(
		`SELECT pm.id, pm.title, pm.status, pm.approved_revision_id, pm.withdrawn_at, pm.withdrawn_reason,
			a.id AS asset_id, a.tag, a.name AS asset_name, a.kind,
			s.id AS site_id, s.code AS site_code, s.name AS site_name,
			ar.id AS area_id, ar.code AS area_code, ar.name AS area_name
		FROM plant_models pm
		JOIN assets a ON a.id = pm.asset_id
		JOIN sites s ON s.id = a.site_id
		JOIN areas ar ON ar.id = a.area_id
		WHERE pm.id = :modelId`,
		{ type: QueryTypes.SELECT, replacements: { modelId } }
	);
	const head = heads[0];
	if (!head || (head.approved_revision_id === null && !drafts)) throw new NotFound('There is no model with this id.');

	const revisions = await db.query<Record<string, unknown>>(
		`SELECT ${REVISION_COLUMNS}, r.created_at
		FROM model_revisions r
		JOIN users au ON au.id = r.author_id
		LEFT JOIN users rv ON rv.id = r.reviewer_id
		LEFT JOIN attachments att ON att.id = r.data_attachment_id
		WHERE r.model_id = :modelId
		ORDER BY r.revision_no DESC`,
		{ type: QueryTypes.SELECT, replacements: { modelId } }
	);
	const approvedId = head.approved_revision_id === null ? null : Number(head.approved_revision_id);
	const defaultRaw = approvedId === null ? revisions[0] : revisions.find((r) => Number(r.id) === approvedId);
	if (!defaultRaw) throw new NotFound('There is no model with this id.');
	let shownRaw = defaultRaw;
	if (options.revisionId) {
		const asked = revisions.find((r) => Number(r.id) === options.revisionId);
		if (!asked || (!drafts && asked.approved_at === null)) throw new NotFound('This model has no such revision.');
		shownRaw = asked;
	}
	const revision = toRevision(shownRaw);
	const reference = toRevision(defaultRaw);

	const newest = revisions[0];
	const pendingStates = new Set(['draft', 'in_review', 'changes_requested']);
	const pending =
		drafts && approvedId !== null && newest && Number(newest.id) !== approvedId && pendingStates.has(String(newest.state))
			? {
					id: Number(newest.id),
					no: Number(newest.revision_no),
					state: String(newest.state),
					authorName: String(newest.author_name),
					submittedAt: iso(newest.submitted_at)
				}
			: null;

	const visibleHistory = drafts ? revisions : revisions.filter((r) => r.approved_at !== null);
	const history: RevisionListItem[] = visibleHistory.map((r) => ({
		id: Number(r.id),
		no: Number(r.revision_no),
		state: String(r.state),
		authorName: String(r.author_name),
		reviewerName: str(r.reviewer_name),
		createdAt: iso(r.created_at) ?? '',
		submittedAt: iso(r.submitted_at),
		approvedAt: iso(r.approved_at),
		changeSummary: str(r.change_summary)
	}));

	const [tuningSets, noteRows] = await Promise.all([
		listTuningSets(actor, { modelId }),
		db.query<Record<string, unknown>>(
			`SELECT n.id, n.title, n.body_md, u.name AS author_name, n.updated_at
			FROM notes n JOIN users u ON u.id = n.author_id
			WHERE n.model_id = :modelId ORDER BY n.created_at, n.id`,
			{ type: QueryTypes.SELECT, replacements: { modelId } }
		)
	]);

	const status = String(head.status) as ModelPageDto['status'];
	return {
		id: Number(head.id),
		title: String(head.title),
		status,
		withdrawn: status === 'withdrawn' ? { at: iso(head.withdrawn_at), reason: str(head.withdrawn_reason) } : null,
		asset: { id: Number(head.asset_id), tag: String(head.tag), name: String(head.asset_name), kind: String(head.kind) },
		site: { id: Number(head.site_id), code: String(head.site_code), name: String(head.site_name) },
		area: { id: Number(head.area_id), code: String(head.area_code), name: String(head.area_name) },
		revision,
		isApproved: approvedId !== null,
		approvedRevisionId: approvedId,
		pending,
		stale: status !== 'withdrawn' && reference.provenance.revalidateBy !== null && reference.provenance.revalidateBy < today,
		history,
		tuningSets,
		notes: noteRows.map((n) => ({
			id: Number(n.id),
			title: String(n.title),
			html: renderNoteMarkdown(String(n.body_md)),
			authorName: String(n.author_name),
			updatedAt: iso(n.updated_at) ?? ''
		})),
		today
	};
}
