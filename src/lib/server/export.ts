/**
 * One plant model as a self-contained document — for the JSON API (`GET /api/v1/models/:id`) and
 * for the export files (`/models/:id/export.json`, `/models/:id/export.csv`). The document holds
 * the revision shown on the model page (the approved one; for engineers and above a never-approved
 * model's newest draft) with every fact of it: structure parameters in seconds AND in the
 * revision's display unit, the transfer function num/den/delay, MV/PV names, units and spans, the
 * operating point, the provenance, the approval facts; and the tuning sets.
 *
 * Visibility follows the read services (`getModelPage`, `getRevision`): a viewer gets approved
 * content only and NotFound for a never-approved model. Returns plain objects; times in seconds
 * unless a field says otherwise; dates YYYY-MM-DD; timestamps ISO 8601 UTC. Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import Papa from 'papaparse';
import { sequelize } from './db/connection';
import { can } from '../auth/roles';
import { getModelPage, listTuningSets, type RevisionDto } from './models';
import { getRevision, type Acting, type WorkflowRevisionDto } from './revisions';
import { parametersForForm, type OperatingPoint, type SignalSpan, type StoredParameters } from '../workflow/model-values';
import type { StructureValue } from '../schemas/revision';
import { METHOD_LABELS, structureLabel } from '../format';

/** Name and version of the document layout; changes to the layout bump the number. */
export const MODEL_DOCUMENT_FORMAT = 'loopledger.model/1';

/** Every fact of one revision. */
export interface RevisionFacts {
	id: number;
	no: number;
	state: string;
	structure: string;
	/** The structure in plain words (e.g. "First order + dead time"). */
	structureName: string;
	/** Parameters as stored: k (integrating: PV per MV per s), tau, tau2, theta in s, zeta, wn in rad/s; rational num/den in s. */
	parametersSeconds: Record<string, number | number[]>;
	/** The same parameters in the revision's display unit (`timeUnit`): times in it, ωn in rad per it, Kv per it. */
	parametersInTimeUnit: Record<string, number | number[] | string>;
	/** G(s) = num(s)/den(s)·e^(−delaySeconds·s), descending powers of s, s in 1/s. */
	transferFunction: { num: number[]; den: number[]; delaySeconds: number };
	/** Process gain ΔPV/ΔMV (integrating models: per second); null when the structure has none. */
	gain: number | null;
	timeConstantSeconds: number | null;
	timeUnit: 's' | 'min';
	mv: SignalSpan;
	pv: SignalSpan;
	operatingPoint: OperatingPoint;
	provenance: {
		method: string;
		methodName: string;
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

/** A tuning set as exported. Ti, Td in seconds; kp as stored for its form. */
export interface TuningSetFacts {
	id: number;
	loopTag: string;
	state: string;
	/** The model revision the settings were computed on. */
	revisionNo: number;
	controllerType: string;
	form: string;
	kp: number;
	tiSeconds: number | null;
	tdSeconds: number | null;
	filterN: number | null;
	weightB: number | null;
	weightC: number | null;
	rule: string | null;
	ruleParameter: number | null;
	/** Metric name → predicted value (null where the metric does not exist, e.g. an unstable loop). */
	predicted: Record<string, number | null>;
	notes: string | null;
	author: string;
	approvedAt: string | null;
}

/** A plant model as one document. */
export interface ModelDocument {
	format: typeof MODEL_DOCUMENT_FORMAT;
	exportedAt: string;
	model: {
		id: number;
		title: string;
		status: 'draft' | 'active' | 'withdrawn';
		withdrawn: { at: string | null; reason: string | null } | null;
		/** The shown revision is an approved one (false: a never-approved draft). */
		isApproved: boolean;
		/** Its revalidate-by date has passed (and it is not withdrawn). */
		stale: boolean;
	};
	asset: { id: number; tag: string; name: string; kind: string };
	site: { id: number; code: string; name: string };
	area: { id: number; code: string; name: string };
	revision: RevisionFacts;
	/**
	 * The newer revision being worked on (draft, in review, changes requested), for readers who may
	 * see drafts; null otherwise and in export files.
	 */
	openRevision: (RevisionFacts & { version: number }) | null;
	/** Revision history as the reader may see it, newest first (API only; empty in export files). */
	history: Array<{ id: number; no: number; state: string; authorName: string; approvedAt: string | null; changeSummary: string | null }>;
	/** Tuning sets: in export files the approved ones; in the API those the reader may see. */
	tuningSets: TuningSetFacts[];
	/** The standing caution, so a file read on its own carries it. */
	caution: string;
}

/** The caution line every export carries. */
export const EXPORT_CAUTION =
	'Predictions from this model are not measurements. Confirm any controller change on the live plant under site procedures and management of change, with operations informed, within local codes and the limits of licensed practice.';

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));
const iso = (v: unknown): string | null => {
	if (v === null || v === undefined) return null;
	const d = v instanceof Date ? v : new Date(`${String(v).replace(' ', 'T')}Z`);
	return Number.isNaN(d.getTime()) ? null : d.toISOString();
};
function jsonOf<T>(v: unknown, fallback: T): T {
	if (v === null || v === undefined) return fallback;
	if (typeof v !== 'string') return v as T;
	try {
		return JSON.parse(v) as T;
	} catch {
		return fallback;
	}
}

/** Only finite numbers and number arrays cross the wire (never NaN or Infinity). */
function finiteParameters(p: Record<string, unknown>): Record<string, number | number[]> {
	const out: Record<string, number | number[]> = {};
	for (const [k, v] of Object.entries(p)) {
		if (typeof v === 'number' && Number.isFinite(v)) out[k] = v;
		else if (Array.isArray(v) && v.every((x) => typeof x === 'number' && Number.isFinite(x))) out[k] = v as number[];
	}
	return out;
}

function inTimeUnit(structure: string, parameters: Record<string, unknown>, unit: 's' | 'min'): Record<string, number | number[] | string> {
	const f = parametersForForm(structure as StructureValue, parameters as StoredParameters, unit);
	const out: Record<string, number | number[] | string> = {};
	for (const [k, v] of Object.entries(f)) {
		if (v === null || v === undefined) continue;
		if (typeof v === 'number' && !Number.isFinite(v)) continue;
		out[k] = v as number | number[] | string;
	}
	return out;
}

/**
 * The exported facts of a revision, from either revision DTO (the read model's or the workflow's);
 * only the data file is looked up differently, so the caller passes it.
 */
function revisionFacts(r: RevisionDto | WorkflowRevisionDto, dataFile: RevisionFacts['provenance']['dataFile']): RevisionFacts {
	const p = r.parameters as Record<string, unknown>;
	return {
		id: r.id,
		no: r.no,
		state: r.state,
		structure: r.structure,
		structureName: structureLabel(r.structure, p as { zeta?: number }),
		parametersSeconds: finiteParameters(p),
		parametersInTimeUnit: inTimeUnit(r.structure, p, r.timeUnit),
		transferFunction: { num: r.num, den: r.den, delaySeconds: r.delaySeconds },
		gain: r.gain,
		timeConstantSeconds: r.timeConstantSeconds,
		timeUnit: r.timeUnit,
		mv: r.mv,
		pv: r.pv,
		operatingPoint: r.operatingPoint,
		provenance: {
			method: r.provenance.method,
			methodName: METHOD_LABELS[r.provenance.method] ?? r.provenance.method,
			testDate: r.provenance.testDate,
			dataFile,
			fitR2: r.provenance.fitR2,
			fitRmse: r.provenance.fitRmse,
			validRange: r.provenance.validRange,
			revalidateBy: r.provenance.revalidateBy
		},
		changeSummary: r.changeSummary,
		author: r.author,
		reviewer: r.reviewer,
		submittedAt: r.submittedAt,
		reviewedAt: r.reviewedAt,
		approvedAt: r.approvedAt
	};
}

function factsOfPage(r: RevisionDto): RevisionFacts {
	return revisionFacts(r, r.provenance.dataFile);
}

async function dataFileOf(attachmentId: number | null): Promise<RevisionFacts['provenance']['dataFile']> {
	if (attachmentId === null) return null;
	const rows = await sequelize().query<Record<string, unknown>>('SELECT filename, size_bytes, media_type FROM attachments WHERE id = :id', {
		type: QueryTypes.SELECT,
		replacements: { id: attachmentId }
	});
	const a = rows[0];
	return a ? { filename: String(a.filename), sizeBytes: Number(a.size_bytes), mediaType: String(a.media_type) } : null;
}

async function factsOfWorkflow(r: WorkflowRevisionDto): Promise<RevisionFacts & { version: number }> {
	return { ...revisionFacts(r, await dataFileOf(r.provenance.dataAttachmentId)), version: r.version };
}

const OPEN_STATES = new Set(['draft', 'in_review', 'changes_requested']);

/** Tuning sets of a model in full (with predicted metrics and weights); `approvedOnly` for exports. */
async function tuningFacts(modelId: number, ids: number[] | null): Promise<TuningSetFacts[]> {
	if (ids !== null && ids.length === 0) return [];
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT t.id, t.loop_tag, t.state, r.revision_no, t.controller_type, t.form, t.kp, t.ti_s, t.td_s, t.filter_n,
			t.weight_b, t.weight_c, t.rule, t.rule_parameter, t.predicted, t.notes, u.name AS author_name, t.approved_at
		FROM tuning_sets t
		JOIN model_revisions r ON r.id = t.model_revision_id
		JOIN users u ON u.id = t.author_id
		WHERE t.model_id = :modelId ${ids === null ? `AND t.state = 'approved'` : 'AND t.id IN (:ids)'}
		ORDER BY t.loop_tag, t.id`,
		{ type: QueryTypes.SELECT, replacements: { modelId, ids: ids ?? [0] } }
	);
	return rows.map((t) => {
		const predicted: Record<string, number | null> = {};
		for (const [k, v] of Object.entries(jsonOf<Record<string, unknown>>(t.predicted, {}) ?? {})) {
			predicted[k] = typeof v === 'number' && Number.isFinite(v) ? v : null;
		}
		return {
			id: Number(t.id),
			loopTag: String(t.loop_tag),
			state: String(t.state),
			revisionNo: Number(t.revision_no),
			controllerType: String(t.controller_type),
			form: String(t.form),
			kp: Number(t.kp),
			tiSeconds: num(t.ti_s),
			tdSeconds: num(t.td_s),
			filterN: num(t.filter_n),
			weightB: num(t.weight_b),
			weightC: num(t.weight_c),
			rule: t.rule === null ? null : String(t.rule),
			ruleParameter: num(t.rule_parameter),
			predicted,
			notes: t.notes === null ? null : String(t.notes),
			author: String(t.author_name),
			approvedAt: iso(t.approved_at)
		};
	});
}

/**
 * The document of one model for `acting` (see the module comment). `purpose: 'export'` leaves out
 * the open revision and the history and keeps approved tuning sets only. NotFound (404) when the
 * model does not exist or the reader may not see it.
 */
export async function modelDocument(acting: Acting, modelId: number, purpose: 'api' | 'export' = 'api', now: Date = new Date()): Promise<ModelDocument> {
	const actor = { id: acting.user.id, role: acting.user.role };
	const page = await getModelPage(actor, modelId);
	let openRevision: ModelDocument['openRevision'] = null;
	let tuningSets: TuningSetFacts[];
	if (purpose === 'api') {
		const open = can(acting.user.role, 'model.read_draft')
			? page.history.find((h) => OPEN_STATES.has(h.state) && h.id !== page.revision.id)
			: undefined;
		if (open) openRevision = await factsOfWorkflow((await getRevision(acting, open.id)).revision);
		const visible = await listTuningSets(actor, { modelId });
		tuningSets = await tuningFacts(modelId, visible.map((t) => t.id));
	} else {
		tuningSets = await tuningFacts(modelId, null);
	}
	return {
		format: MODEL_DOCUMENT_FORMAT,
		exportedAt: now.toISOString(),
		model: { id: page.id, title: page.title, status: page.status, withdrawn: page.withdrawn, isApproved: page.isApproved, stale: page.stale },
		asset: page.asset,
		site: page.site,
		area: page.area,
		revision: factsOfPage(page.revision),
		openRevision,
		history:
			purpose === 'api'
				? page.history.map((h) => ({ id: h.id, no: h.no, state: h.state, authorName: h.authorName, approvedAt: h.approvedAt, changeSummary: h.changeSummary }))
				: [],
		tuningSets,
		caution: EXPORT_CAUTION
	};
}

/**
 * The file name of an export: the asset tag (characters other than letters, digits, `.`, `_`, `-`
 * replaced by `_`), the model id and the revision number, e.g. `TIC-2104_model-12_rev-3.json`.
 */
export function exportFilename(doc: Pick<ModelDocument, 'asset' | 'model' | 'revision'>, extension: 'json' | 'csv'): string {
	const tag = doc.asset.tag.replace(/[^A-Za-z0-9._-]/g, '_').replace(/^\.+/, '_') || 'model';
	return `${tag}_model-${doc.model.id}_rev-${doc.revision.no}.${extension}`;
}

/** Columns of the CSV export, in order. */
export const CSV_COLUMNS = ['section', 'item', 'value', 'unit', 'note'] as const;

type Cell = string | number | null;

/**
 * The model document as CSV (RFC 4180: comma-separated, CRLF line ends, quotes doubled), one row per
 * fact with the columns `section,item,value,unit,note`:
 * - `model`, `asset`, `place`: identity (title, state, tag, kind, site, area);
 * - `parameter`: each structure parameter in seconds (item = parameter name, e.g. `tau`), the unit
 *   in the unit column and its display-unit value in the note;
 * - `transfer function`: `num[i]` / `den[i]` (descending powers of s, s in 1/s) and `delay`;
 * - `signal`: MV and PV name, unit, span; `operating point`; `provenance`; `approval`;
 * - `tuning set <loop tag>`: controller type, form, kp, ti, td, N, weights, rule, predicted metrics.
 * Empty values are empty cells, never NaN. Text cells starting with `=`, `+`, `-`, `@`, tab or
 * carriage return get a leading apostrophe against spreadsheet formula injection (OWASP "CSV
 * Injection", common practice; papaparse's `escapeFormulae`); numbers are written as numbers.
 */
export function modelCsv(doc: ModelDocument): string {
	const rows: Cell[][] = [[...CSV_COLUMNS]];
	const add = (section: string, item: string, value: Cell, unit: Cell = '', note: Cell = '') =>
		rows.push([section, item, value === null || (typeof value === 'number' && !Number.isFinite(value)) ? '' : value, unit ?? '', note ?? '']);
	const r = doc.revision;
	const tu = r.timeUnit;
	add('model', 'id', doc.model.id);
	add('model', 'title', doc.model.title);
	add('model', 'status', doc.model.status);
	add('model', 'revision', r.no, '', r.state);
	add('model', 'structure', r.structure, '', r.structureName);
	add('model', 'display time unit', tu);
	add('asset', 'tag', doc.asset.tag);
	add('asset', 'name', doc.asset.name);
	add('asset', 'kind', doc.asset.kind);
	add('place', 'site', doc.site.code, '', doc.site.name);
	add('place', 'area', doc.area.code, '', doc.area.name);
	const gainUnit = `${r.pv.unit}/${r.mv.unit}`;
	const integrating = r.structure === 'ipdt';
	const units: Record<string, string> = {
		k: integrating ? `${gainUnit}/s` : gainUnit,
		tau: 's',
		tau2: 's',
		theta: 's',
		zeta: '',
		wn: 'rad/s'
	};
	const displayUnits: Record<string, string> = {
		k: integrating ? `${gainUnit}/${tu}` : gainUnit,
		tau: tu,
		tau2: tu,
		theta: tu,
		zeta: '',
		wn: `rad/${tu}`
	};
	for (const [name, value] of Object.entries(r.parametersSeconds)) {
		if (Array.isArray(value)) continue;
		const shown = r.parametersInTimeUnit[name];
		add('parameter', name, value, units[name] ?? '', typeof shown === 'number' && tu !== 's' ? `${shown} ${displayUnits[name] ?? ''}`.trim() : '');
	}
	r.transferFunction.num.forEach((c, i) => add('transfer function', `num[${i}]`, c, '', `coefficient of s^${r.transferFunction.num.length - 1 - i}`));
	r.transferFunction.den.forEach((c, i) => add('transfer function', `den[${i}]`, c, '', `coefficient of s^${r.transferFunction.den.length - 1 - i}`));
	add('transfer function', 'delay', r.transferFunction.delaySeconds, 's');
	for (const [key, s] of [['MV', r.mv], ['PV', r.pv]] as const) {
		add('signal', `${key} name`, s.name);
		add('signal', `${key} span minimum`, s.min, s.unit);
		add('signal', `${key} span maximum`, s.max, s.unit);
	}
	add('operating point', 'MV', r.operatingPoint.mv, r.mv.unit);
	add('operating point', 'PV', r.operatingPoint.pv, r.pv.unit);
	add('operating point', 'note', r.operatingPoint.note);
	add('provenance', 'method', r.provenance.method, '', r.provenance.methodName);
	add('provenance', 'test date', r.provenance.testDate);
	add('provenance', 'data file', r.provenance.dataFile?.filename ?? null);
	add('provenance', 'fit R2', r.provenance.fitR2);
	add('provenance', 'fit RMS error', r.provenance.fitRmse, r.pv.unit);
	add('provenance', 'valid range', r.provenance.validRange);
	add('provenance', 'revalidate by', r.provenance.revalidateBy, '', doc.model.stale ? 'overdue' : '');
	add('approval', 'author', r.author.name);
	add('approval', 'reviewer', r.reviewer?.name ?? null);
	add('approval', 'approved at', r.approvedAt);
	add('approval', 'change summary', r.changeSummary);
	for (const t of doc.tuningSets) {
		const section = `tuning set ${t.loopTag}`;
		add(section, 'controller', t.controllerType, '', t.form);
		add(section, 'kp', t.kp, '', 'as stored for its form');
		add(section, 'ti', t.tiSeconds, 's');
		add(section, 'td', t.tdSeconds, 's');
		add(section, 'derivative filter N', t.filterN);
		add(section, 'set-point weight b', t.weightB);
		add(section, 'set-point weight c', t.weightC);
		add(section, 'rule', t.rule, '', t.ruleParameter === null ? '' : `parameter ${t.ruleParameter}`);
		for (const [metric, value] of Object.entries(t.predicted)) add(section, `predicted ${metric}`, value);
		add(section, 'approved at', t.approvedAt);
	}
	add('caution', 'caution', doc.caution);
	return Papa.unparse(rows, { newline: '\r\n', quotes: false, escapeFormulae: true });
}
