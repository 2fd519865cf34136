/**
 * The model form's values and checks, shared by the page actions (server) and the form component
 * (browser): values travel as strings (what inputs hold and FormData carries), are checked with the
 * shared zod schemas of `$lib/schemas/revision`, and errors map one to one onto fields. Pure.
 */
import {
	fieldErrors,
	modelCreateSchema,
	parametersOf,
	REVISION_FIELD_LABELS,
	revisionEditSchema,
	revisionSchema,
	type RevisionInput,
	type SopdtForm,
	type StructureValue,
	STRUCTURE_VALUES
} from '../../schemas/revision';

/** The form's values as the inputs hold them (strings; '' for empty). */
export type FormStrings = Record<string, string>;

/** Which form: a new model (with its asset), a new revision of a model, or an edit of a draft. */
export type FormMode = 'create' | 'revise' | 'edit';

/** How the asset of a new model is given: an existing one, or a new one described inline. */
export type AssetMode = 'existing' | 'new';

/** Fields of the asset part of the create form. */
export const ASSET_FIELDS = ['assetId', 'newAssetAreaId', 'newAssetTag', 'newAssetKind', 'newAssetName', 'newAssetDescription'] as const;
const NEW_ASSET_FIELDS = ASSET_FIELDS.filter((f) => f !== 'assetId');

/** Every revision field the form posts, in the order the form shows them. */
export const REVISION_FORM_FIELDS = [
	'mvName',
	'mvUnit',
	'mvMin',
	'mvMax',
	'pvName',
	'pvUnit',
	'pvMin',
	'pvMax',
	'structure',
	'sopdtForm',
	'timeUnit',
	'k',
	'tau',
	'tau2',
	'zeta',
	'wn',
	'theta',
	'num',
	'den',
	'opMv',
	'opPv',
	'opNote',
	'method',
	'testDate',
	'fitR2',
	'fitRmse',
	'validRange',
	'revalidateBy',
	'changeSummary'
] as const;

/** Parameter fields (the ones that depend on the structure). */
export const PARAMETER_FIELDS = ['k', 'tau', 'tau2', 'zeta', 'wn', 'theta', 'num', 'den'] as const;
type ParameterField = (typeof PARAMETER_FIELDS)[number];

/** Starting values of a new model: FOPDT in seconds, identified by a step test. */
export const NEW_MODEL_DEFAULTS: FormStrings = {
	assetMode: 'existing',
	title: '',
	structure: 'fopdt',
	sopdtForm: 'time_constants',
	timeUnit: 's',
	method: 'step_test'
};

function str(v: unknown): string {
	if (v === null || v === undefined) return '';
	if (Array.isArray(v)) return v.map((x) => String(x)).join(', ');
	return String(v);
}

/** A validated (or stored) revision as form strings: numbers as typed, null as '', coefficients comma-separated. */
export function toFormStrings(input: Partial<RevisionInput>): FormStrings {
	const out: FormStrings = {};
	for (const [k, v] of Object.entries(input)) out[k] = str(v);
	if (!out.sopdtForm) out.sopdtForm = 'time_constants';
	return out;
}

/** The structure chosen in the form (FOPDT when the value is not one). */
export function structureOf(values: FormStrings): StructureValue {
	return (STRUCTURE_VALUES as readonly string[]).includes(values.structure) ? (values.structure as StructureValue) : 'fopdt';
}

/** The SOPDT form chosen (time constants unless "damping"). */
export function sopdtFormOf(values: FormStrings): SopdtForm {
	return values.sopdtForm === 'damping' ? 'damping' : 'time_constants';
}

/** The parameter fields the form shows for the chosen structure, in order. */
export function parameterFieldsOf(values: FormStrings): ParameterField[] {
	const structure = structureOf(values);
	const used = new Set<string>(parametersOf(structure, structure === 'sopdt' ? sopdtFormOf(values) : null));
	return PARAMETER_FIELDS.filter((f) => used.has(f));
}

/**
 * The values to validate: parameters of other structures left out (they stay in the inputs' state
 * so switching back restores them, but are never saved), and for a new model only the asset part
 * the person chose (an existing asset, or the fields of a new one).
 */
export function submittedValues(mode: FormMode, values: FormStrings): FormStrings {
	const out: FormStrings = {};
	const params = new Set<string>(parameterFieldsOf(values));
	for (const [k, v] of Object.entries(values)) {
		if ((PARAMETER_FIELDS as readonly string[]).includes(k) && !params.has(k)) continue;
		out[k] = v;
	}
	if (mode === 'create') {
		if (values.assetMode === 'new') delete out.assetId;
		else for (const f of NEW_ASSET_FIELDS) delete out[f];
	} else {
		delete out.title;
		for (const f of ASSET_FIELDS) delete out[f];
	}
	return out;
}

/** The schema of each mode (`now` for "test date not in the future"). */
export function schemaOf(mode: FormMode, now: () => Date = () => new Date()) {
	if (mode === 'create') return modelCreateSchema(now);
	if (mode === 'edit') return revisionEditSchema(now);
	return revisionSchema(now);
}

/** Field → message for everything wrong with the form's values (empty when it may be saved). */
export function validateForm(mode: FormMode, values: FormStrings, now: () => Date = () => new Date()): Record<string, string> {
	const parsed = schemaOf(mode, now).safeParse(submittedValues(mode, values));
	return parsed.success ? {} : fieldErrors(parsed.error);
}

/** Labels of the fields, for conflict tables and error summaries. */
export function fieldLabel(field: string, values?: FormStrings): string {
	if (field === 'k' && values && structureOf(values) === 'ipdt') return 'Integrating gain Kv';
	return (REVISION_FIELD_LABELS as Record<string, string>)[field] ?? field;
}

/** What the edit page passes after a conflicting save of a draft (someone saved in between). */
export interface ConflictView {
	message: string;
	/** The stored version: saving again with it replaces the stored values deliberately. */
	version: number;
	/** Who saved last, by name (null when unknown). */
	updatedBy: string | null;
	/** When, ISO 8601 UTC. */
	updatedAt: string;
	/** The stored values as form strings. */
	stored: FormStrings;
}

/** One line of the "someone saved in between" table. */
export interface ConflictRow {
	field: string;
	label: string;
	stored: string;
	yours: string;
}

/**
 * The fields where the stored draft and the editor's values differ, in form order, with both
 * values as text. Fields the form does not show for the stored or the typed structure are skipped
 * unless the structure itself differs.
 */
export function conflictRows(stored: FormStrings, yours: FormStrings): ConflictRow[] {
	const shown = new Set<string>([...parameterFieldsOf(stored), ...parameterFieldsOf(yours)]);
	const norm = (field: string, v: string | undefined) => {
		const t = (v ?? '').trim();
		if ((PARAMETER_FIELDS as readonly string[]).includes(field) || /Min$|Max$|^op(Mv|Pv)$|^fit/.test(field)) {
			const parts = t.split(/[\s,;]+/).filter(Boolean);
			if (parts.length && parts.every((p) => /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(p))) return parts.map(Number).join(', ');
		}
		return t;
	};
	const rows: ConflictRow[] = [];
	for (const field of REVISION_FORM_FIELDS) {
		if ((PARAMETER_FIELDS as readonly string[]).includes(field) && !shown.has(field)) continue;
		if (field === 'sopdtForm' && structureOf(stored) !== 'sopdt' && structureOf(yours) !== 'sopdt') continue;
		const a = norm(field, stored[field]);
		const b = norm(field, yours[field]);
		if (a !== b) rows.push({ field, label: fieldLabel(field, yours), stored: a, yours: b });
	}
	return rows;
}
