/**
 * Input shapes of the review workflow: a plant-model revision (create and edit), a new model with
 * its asset, and the review actions (approve, send back, withdraw, revalidate). One schema per
 * shape, shared by the form actions, the JSON API and the forms, so a field gets the same message
 * everywhere; every message names its field. Pure: usable on the server and in components.
 *
 * Field names are flat (`k`, `tau`, `mvMin` …) so an HTML form posts them as they are and the
 * errors map one to one onto inputs. Values arrive as strings (FormData) or numbers (JSON); empty
 * strings mean "not given". Times are entered in the revision's `timeUnit` (s or min): τ, τ2, θ in
 * that unit, ωn in rad per that unit, Kv per that unit, rational coefficients with s in 1/unit.
 * `toStoredModel` in `../workflow/model-values` converts them to seconds for storage.
 */
import { z } from 'zod';

/** Model structures of the register (PRODUCT.md "Plant model"). */
export const STRUCTURE_VALUES = ['fopdt', 'sopdt', 'ipdt', 'second_order', 'rational'] as const;
/** One structure code. */
export type StructureValue = (typeof STRUCTURE_VALUES)[number];
/** How an SOPDT model is written: two time constants τ, τ2, or damping ratio ζ and natural frequency ωn. */
export const SOPDT_FORM_VALUES = ['time_constants', 'damping'] as const;
/** One SOPDT form. */
export type SopdtForm = (typeof SOPDT_FORM_VALUES)[number];
/** Display and entry time units of a revision. */
export const TIME_UNIT_VALUES = ['s', 'min'] as const;
/** s or min. */
export type TimeUnitValue = (typeof TIME_UNIT_VALUES)[number];
/** Identification methods (PRODUCT.md "Provenance"). */
export const METHOD_VALUES = ['step_test', 'two_point', 'least_squares', 'datasheet', 'first_principles'] as const;
/** One identification method. */
export type MethodValue = (typeof METHOD_VALUES)[number];
/** Asset kinds (PRODUCT.md "Site → Area → Asset"). */
export const ASSET_KIND_VALUES = [
	'pump',
	'oven',
	'heat_exchanger',
	'tank',
	'chiller',
	'dryer',
	'fan',
	'conveyor',
	'boiler',
	'valve',
	'other'
] as const;
/** One asset kind. */
export type AssetKindValue = (typeof ASSET_KIND_VALUES)[number];

/** Highest polynomial order of a rational model (numerator and denominator). */
export const MAX_RATIONAL_ORDER = 10;

/** Human names of the fields, used in every message and usable as form labels. */
export const REVISION_FIELD_LABELS = {
	title: 'Model title',
	assetId: 'Asset',
	newAssetAreaId: 'Area of the new asset',
	newAssetTag: 'Tag of the new asset',
	newAssetKind: 'Kind of the new asset',
	newAssetName: 'Name of the new asset',
	newAssetDescription: 'Description of the new asset',
	structure: 'Structure',
	sopdtForm: 'SOPDT form',
	k: 'Gain K',
	tau: 'Time constant τ',
	tau2: 'Time constant τ2',
	zeta: 'Damping ratio ζ',
	wn: 'Natural frequency ωn',
	theta: 'Dead time θ',
	num: 'Numerator coefficients',
	den: 'Denominator coefficients',
	timeUnit: 'Time unit',
	mvName: 'MV name',
	mvUnit: 'MV unit',
	mvMin: 'MV span minimum',
	mvMax: 'MV span maximum',
	pvName: 'PV name',
	pvUnit: 'PV unit',
	pvMin: 'PV span minimum',
	pvMax: 'PV span maximum',
	opMv: 'Operating point MV',
	opPv: 'Operating point PV',
	opNote: 'Operating point note',
	method: 'Identification method',
	testDate: 'Test date',
	fitR2: 'Fit R²',
	fitRmse: 'Fit RMS error',
	validRange: 'Valid operating range',
	revalidateBy: 'Revalidate by',
	changeSummary: 'Change summary',
	dataAttachmentId: 'Step-test data file',
	version: 'Version',
	comment: 'Review comment',
	reason: 'Reason'
} as const;
/** A field name of the revision forms. */
export type RevisionField = keyof typeof REVISION_FIELD_LABELS;
const L = REVISION_FIELD_LABELS;

// ── Field parsers ────────────────────────────────────────────────────────────────────────────

const DECIMAL = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/** '' / null / undefined → undefined; a decimal string → number; anything else unchanged (fails later). */
export function toNumber(v: unknown): unknown {
	if (v === undefined || v === null) return undefined;
	if (typeof v === 'string') {
		const t = v.trim();
		if (t === '') return undefined;
		return DECIMAL.test(t) ? Number(t) : v;
	}
	return v;
}

/** '' / null / undefined / blank → undefined; text trimmed with line ends normalised to \n. */
export function toText(v: unknown): unknown {
	if (v === undefined || v === null) return undefined;
	if (typeof v === 'string') {
		const t = v.replace(/\r\n?/g, '\n').trim();
		return t === '' ? undefined : t;
	}
	return v;
}

const finite = (label: string) =>
	z
		.number({ error: `${label}: enter a number.` })
		.refine((x) => Number.isFinite(x), `${label} must be a finite number.`);

/** An optional number: empty → undefined. */
export const optionalNumber = (label: string) => z.preprocess(toNumber, finite(label).optional());
/** A required number. */
const requiredNumber = (label: string) =>
	z.preprocess(toNumber, z.number({ error: (i) => (i.input === undefined ? `${label}: enter a value.` : `${label}: enter a number.`) }).refine(
		(x) => Number.isFinite(x),
		`${label} must be a finite number.`
	));

const SINGLE_LINE_BAD = /[\u0000-\u001f\u007f]/;
const MULTI_LINE_BAD = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;

/** A required single-line text of at most `max` characters. */
const requiredLine = (label: string, max: number) =>
	z.preprocess(
		toText,
		z
			.string({ error: (i) => (i.input === undefined ? `${label}: enter a value.` : `${label} must be text.`) })
			.max(max, `${label} has at most ${max} characters.`)
			.refine((s) => !SINGLE_LINE_BAD.test(s), `${label} must be a single line without control characters.`)
	);
const optionalLine = (label: string, max: number) =>
	z.preprocess(
		toText,
		z
			.string({ error: `${label} must be text.` })
			.max(max, `${label} has at most ${max} characters.`)
			.refine((s) => !SINGLE_LINE_BAD.test(s), `${label} must be a single line without control characters.`)
			.optional()
	);
const requiredText = (label: string, max: number) =>
	z.preprocess(
		toText,
		z
			.string({ error: (i) => (i.input === undefined ? `${label}: enter a value.` : `${label} must be text.`) })
			.max(max, `${label} has at most ${max} characters.`)
			.refine((s) => !MULTI_LINE_BAD.test(s), `${label} must not contain control characters.`)
	);
const optionalText = (label: string, max: number) =>
	z.preprocess(
		toText,
		z
			.string({ error: `${label} must be text.` })
			.max(max, `${label} has at most ${max} characters.`)
			.refine((s) => !MULTI_LINE_BAD.test(s), `${label} must not contain control characters.`)
			.optional()
	);

/** True for a real calendar date written `YYYY-MM-DD`. */
export function isIsoDate(s: string): boolean {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
	const d = new Date(`${s}T00:00:00Z`);
	return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}

const dateField = (label: string) =>
	z
		.string({ error: `${label}: enter a date (YYYY-MM-DD).` })
		.refine(isIsoDate, `${label}: enter a real date as YYYY-MM-DD.`);
const optionalDate = (label: string) => z.preprocess(toText, dateField(label).optional());
const requiredDate = (label: string) =>
	z.preprocess(
		toText,
		z
			.string({ error: (i) => (i.input === undefined ? `${label}: enter a date (YYYY-MM-DD).` : `${label}: enter a date (YYYY-MM-DD).`) })
			.refine(isIsoDate, `${label}: enter a real date as YYYY-MM-DD.`)
	);

const positiveId = (label: string) =>
	z.preprocess(toNumber, z.number({ error: `${label}: choose one.` }).int(`${label}: choose one.`).positive(`${label}: choose one.`));
const optionalId = (label: string) => z.preprocess(toNumber, z.number({ error: `${label} is not valid.` }).int(`${label} is not valid.`).positive(`${label} is not valid.`).optional());

/**
 * Polynomial coefficients, descending powers of s: an array of numbers, or text with the numbers
 * separated by commas, semicolons or spaces ("0.5, 1" or "0.5 1"). Empty → undefined.
 */
function toCoefficients(v: unknown): unknown {
	if (v === undefined || v === null) return undefined;
	if (Array.isArray(v)) return v.map(toNumber);
	if (typeof v === 'string') {
		const t = v.trim().replace(/^\[|\]$/g, '').trim();
		if (t === '') return undefined;
		return t.split(/[\s,;]+/).filter(Boolean).map(toNumber);
	}
	return v;
}
const coefficients = (label: string) =>
	z.preprocess(
		toCoefficients,
		z
			.array(z.number({ error: `${label}: every coefficient must be a number.` }), { error: `${label}: list numbers separated by commas.` })
			.max(MAX_RATIONAL_ORDER + 1, `${label}: at most ${MAX_RATIONAL_ORDER + 1} coefficients (order ${MAX_RATIONAL_ORDER}).`)
			.refine((a) => a.every((x) => Number.isFinite(x)), `${label}: every coefficient must be a finite number.`)
			.optional()
	);

const enumField = <T extends readonly [string, ...string[]]>(values: T, label: string, hint: string) =>
	z.preprocess(toText, z.enum(values, { error: `${label}: choose ${hint}.` }));

// ── The revision ─────────────────────────────────────────────────────────────────────────────

/** Fields of a model revision as entered (before the structure check). */
const revisionShape = {
	structure: enumField(STRUCTURE_VALUES, L.structure, 'FOPDT, SOPDT, IPDT, second order or rational'),
	sopdtForm: z.preprocess(toText, z.enum(SOPDT_FORM_VALUES, { error: `${L.sopdtForm}: choose time constants or damping.` }).optional()),
	k: optionalNumber(L.k),
	tau: optionalNumber(L.tau),
	tau2: optionalNumber(L.tau2),
	zeta: optionalNumber(L.zeta),
	wn: optionalNumber(L.wn),
	theta: optionalNumber(L.theta),
	num: coefficients(L.num),
	den: coefficients(L.den),
	timeUnit: z.preprocess(toText, z.enum(TIME_UNIT_VALUES, { error: `${L.timeUnit}: choose s or min.` }).default('s')),
	mvName: requiredLine(L.mvName, 120),
	mvUnit: requiredLine(L.mvUnit, 32),
	mvMin: requiredNumber(L.mvMin),
	mvMax: requiredNumber(L.mvMax),
	pvName: requiredLine(L.pvName, 120),
	pvUnit: requiredLine(L.pvUnit, 32),
	pvMin: requiredNumber(L.pvMin),
	pvMax: requiredNumber(L.pvMax),
	opMv: optionalNumber(L.opMv),
	opPv: optionalNumber(L.opPv),
	opNote: optionalLine(L.opNote, 500),
	method: enumField(METHOD_VALUES, L.method, 'step test, two-point, least-squares fit, datasheet or first principles'),
	testDate: optionalDate(L.testDate),
	fitR2: optionalNumber(L.fitR2),
	fitRmse: optionalNumber(L.fitRmse),
	validRange: optionalLine(L.validRange, 500),
	revalidateBy: optionalDate(L.revalidateBy),
	changeSummary: requiredText(L.changeSummary, 4000),
	dataAttachmentId: optionalId(L.dataAttachmentId)
};

/** A validated revision, flat; parameters that do not belong to the structure are null. */
export interface RevisionInput {
	structure: StructureValue;
	/** SOPDT only; null for other structures. */
	sopdtForm: SopdtForm | null;
	/** Gain K (PV unit per MV unit) or, for IPDT, Kv (PV unit per MV unit per time unit). */
	k: number | null;
	tau: number | null;
	tau2: number | null;
	zeta: number | null;
	/** Natural frequency in rad per time unit. */
	wn: number | null;
	/** Dead time in the time unit (0 when not given for structures that have one; null for second order). */
	theta: number | null;
	num: number[] | null;
	den: number[] | null;
	timeUnit: TimeUnitValue;
	mvName: string;
	mvUnit: string;
	mvMin: number;
	mvMax: number;
	pvName: string;
	pvUnit: string;
	pvMin: number;
	pvMax: number;
	opMv: number | null;
	opPv: number | null;
	opNote: string | null;
	method: MethodValue;
	testDate: string | null;
	fitR2: number | null;
	fitRmse: number | null;
	validRange: string | null;
	revalidateBy: string | null;
	changeSummary: string;
	dataAttachmentId: number | null;
}

type Raw = Record<string, unknown>;
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const missing = (v: unknown) => v === undefined || v === null;

/** Which parameters each structure (and SOPDT form) uses. */
export function parametersOf(structure: StructureValue, sopdtForm: SopdtForm | null = null): readonly (keyof RevisionInput)[] {
	switch (structure) {
		case 'fopdt':
			return ['k', 'tau', 'theta'];
		case 'sopdt':
			return sopdtForm === 'damping' ? ['k', 'zeta', 'wn', 'theta'] : ['k', 'tau', 'tau2', 'theta'];
		case 'ipdt':
			return ['k', 'theta'];
		case 'second_order':
			return ['k', 'zeta', 'wn'];
		case 'rational':
			return ['num', 'den', 'theta'];
	}
}

/** Leading zeros removed (descending powers); [] when every coefficient is 0. */
function trimLeading(a: readonly number[]): number[] {
	const i = a.findIndex((x) => x !== 0);
	return i < 0 ? [] : a.slice(i);
}

/** The UTC calendar date of `now` plus `days`, as YYYY-MM-DD. */
function utcDate(now: Date, days = 0): string {
	return new Date(now.getTime() + days * 86_400_000).toISOString().slice(0, 10);
}

function checkRevision(v: Raw, ctx: z.RefinementCtx, now: () => Date): void {
	const add = (field: RevisionField, message: string) => ctx.addIssue({ code: 'custom', path: [field], message });
	const structure = v.structure as StructureValue | undefined;
	if (structure && (STRUCTURE_VALUES as readonly string[]).includes(structure)) {
		const form = (v.sopdtForm as SopdtForm | undefined) ?? 'time_constants';
		const kLabel = structure === 'ipdt' ? 'Integrating gain Kv' : L.k;
		const need = (field: 'k' | 'tau' | 'tau2' | 'zeta' | 'wn', label: string, test: (x: number) => boolean, rule: string) => {
			const x = v[field];
			if (missing(x)) add(field, `${label}: enter a value.`);
			else if (isNum(x) && !test(x)) add(field, `${label} ${rule}`);
		};
		const thetaOk = () => {
			if (isNum(v.theta) && v.theta < 0) add('theta', `${L.theta} must be zero or positive.`);
		};
		switch (structure) {
			case 'fopdt':
				need('k', kLabel, (x) => x !== 0, 'must not be zero.');
				need('tau', L.tau, (x) => x > 0, 'must be greater than zero.');
				thetaOk();
				break;
			case 'sopdt':
				need('k', kLabel, (x) => x !== 0, 'must not be zero.');
				if (form === 'damping') {
					need('zeta', L.zeta, (x) => x > 0, 'must be greater than zero.');
					need('wn', L.wn, (x) => x > 0, 'must be greater than zero.');
				} else {
					need('tau', L.tau, (x) => x > 0, 'must be greater than zero.');
					need('tau2', L.tau2, (x) => x > 0, 'must be greater than zero.');
				}
				thetaOk();
				break;
			case 'ipdt':
				need('k', kLabel, (x) => x !== 0, 'must not be zero.');
				thetaOk();
				break;
			case 'second_order':
				need('k', kLabel, (x) => x !== 0, 'must not be zero.');
				need('zeta', L.zeta, (x) => x > 0, 'must be greater than zero.');
				need('wn', L.wn, (x) => x > 0, 'must be greater than zero.');
				if (isNum(v.theta) && v.theta !== 0) {
					add('theta', `${L.theta}: a standard second-order model has no dead time; choose SOPDT (damping) for one with dead time.`);
				}
				break;
			case 'rational': {
				thetaOk();
				const num = Array.isArray(v.num) && v.num.every(isNum) ? trimLeading(v.num as number[]) : null;
				const den = Array.isArray(v.den) && v.den.every(isNum) ? trimLeading(v.den as number[]) : null;
				if (missing(v.num)) add('num', `${L.num}: enter at least one coefficient.`);
				else if (num && num.length === 0) add('num', `${L.num}: at least one coefficient must be non-zero.`);
				if (missing(v.den)) add('den', `${L.den}: enter at least one coefficient.`);
				else if (den && den.length === 0) add('den', `${L.den}: at least one coefficient must be non-zero.`);
				else if (den && num && num.length > 0 && num.length > den.length) {
					add('num', `${L.num}: the numerator order may not exceed the denominator order (the model must be proper).`);
				}
				break;
			}
		}
	}
	if (isNum(v.mvMin) && isNum(v.mvMax) && !(v.mvMin < v.mvMax)) add('mvMax', `${L.mvMax} must be greater than the minimum.`);
	if (isNum(v.pvMin) && isNum(v.pvMax) && !(v.pvMin < v.pvMax)) add('pvMax', `${L.pvMax} must be greater than the minimum.`);
	if (isNum(v.opMv) && isNum(v.mvMin) && isNum(v.mvMax) && v.mvMin < v.mvMax && (v.opMv < v.mvMin || v.opMv > v.mvMax)) {
		add('opMv', `${L.opMv} must lie within the MV span.`);
	}
	if (isNum(v.opPv) && isNum(v.pvMin) && isNum(v.pvMax) && v.pvMin < v.pvMax && (v.opPv < v.pvMin || v.opPv > v.pvMax)) {
		add('opPv', `${L.opPv} must lie within the PV span.`);
	}
	if (isNum(v.fitR2) && (v.fitR2 < 0 || v.fitR2 > 1)) add('fitR2', `${L.fitR2} must be between 0 and 1.`);
	if (isNum(v.fitRmse) && v.fitRmse < 0) add('fitRmse', `${L.fitRmse} must be zero or positive.`);
	// One day of slack: the person may be a time zone ahead of UTC.
	if (typeof v.testDate === 'string' && isIsoDate(v.testDate) && v.testDate > utcDate(now(), 1)) {
		add('testDate', `${L.testDate} cannot be in the future.`);
	}
	if (
		typeof v.testDate === 'string' &&
		typeof v.revalidateBy === 'string' &&
		isIsoDate(v.testDate) &&
		isIsoDate(v.revalidateBy) &&
		v.revalidateBy <= v.testDate
	) {
		add('revalidateBy', `${L.revalidateBy} must be after the test date.`);
	}
}

function toRevisionInput(v: Raw): RevisionInput {
	const structure = v.structure as StructureValue;
	const sopdtForm = structure === 'sopdt' ? ((v.sopdtForm as SopdtForm | undefined) ?? 'time_constants') : null;
	const used = new Set(parametersOf(structure, sopdtForm));
	const pick = (f: 'k' | 'tau' | 'tau2' | 'zeta' | 'wn') => (used.has(f) && isNum(v[f]) ? (v[f] as number) : null);
	const opt = <T>(x: unknown) => (x === undefined ? null : (x as T));
	return {
		structure,
		sopdtForm,
		k: pick('k'),
		tau: pick('tau'),
		tau2: pick('tau2'),
		zeta: pick('zeta'),
		wn: pick('wn'),
		theta: used.has('theta') ? (isNum(v.theta) ? v.theta : 0) : null,
		num: structure === 'rational' ? trimLeading(v.num as number[]) : null,
		den: structure === 'rational' ? trimLeading(v.den as number[]) : null,
		timeUnit: v.timeUnit as TimeUnitValue,
		mvName: v.mvName as string,
		mvUnit: v.mvUnit as string,
		mvMin: v.mvMin as number,
		mvMax: v.mvMax as number,
		pvName: v.pvName as string,
		pvUnit: v.pvUnit as string,
		pvMin: v.pvMin as number,
		pvMax: v.pvMax as number,
		opMv: opt<number>(v.opMv),
		opPv: opt<number>(v.opPv),
		opNote: opt<string>(v.opNote),
		method: v.method as MethodValue,
		testDate: opt<string>(v.testDate),
		fitR2: opt<number>(v.fitR2),
		fitRmse: opt<number>(v.fitRmse),
		validRange: opt<string>(v.validRange),
		revalidateBy: opt<string>(v.revalidateBy),
		changeSummary: v.changeSummary as string,
		dataAttachmentId: opt<number>(v.dataAttachmentId)
	};
}

const always = { when: () => true } as const;

/**
 * The revision fields of the create/edit form and the API. `now` (for "test date not in the
 * future") defaults to the current time; tests pass a fixed one.
 */
export function revisionSchema(now: () => Date = () => new Date()) {
	return z
		.object(revisionShape, { error: 'The revision must be an object of fields.' })
		.superRefine((v, ctx) => checkRevision(v as Raw, ctx, now), always)
		.transform((v) => toRevisionInput(v as Raw));
}

/** A new model: its title, the asset (an existing one by id, or a new one in an area), and its first revision. */
export interface ModelCreateInput {
	title: string;
	asset: { id: number } | { areaId: number; tag: string; kind: AssetKindValue; name: string; description: string | null };
	revision: RevisionInput;
}

const TAG = /^[A-Z0-9][A-Z0-9._/-]{0,39}$/;

/** The create-model form: `title`, `assetId` or the `newAsset…` fields, and the revision fields. */
export function modelCreateSchema(now: () => Date = () => new Date()) {
	const assetShape = {
		title: requiredLine(L.title, 200),
		assetId: optionalId(L.assetId),
		newAssetAreaId: optionalId(L.newAssetAreaId),
		newAssetTag: z.preprocess((x) => (typeof toText(x) === 'string' ? (toText(x) as string).toUpperCase() : toText(x)), z.string({ error: `${L.newAssetTag} must be text.` }).optional()),
		newAssetKind: z.preprocess(toText, z.enum(ASSET_KIND_VALUES, { error: `${L.newAssetKind}: choose one of the kinds.` }).optional()),
		newAssetName: optionalLine(L.newAssetName, 160),
		newAssetDescription: optionalText(L.newAssetDescription, 2000)
	};
	return z
		.object({ ...revisionShape, ...assetShape }, { error: 'The model must be an object of fields.' })
		.superRefine((v, ctx) => {
			const raw = v as Raw;
			checkRevision(raw, ctx, now);
			const add = (field: RevisionField, message: string) => ctx.addIssue({ code: 'custom', path: [field], message });
			if (missing(raw.assetId)) {
				const anyNew = ['newAssetAreaId', 'newAssetTag', 'newAssetKind', 'newAssetName'].some((f) => !missing(raw[f]));
				if (!anyNew) {
					add('assetId', `${L.assetId}: choose an asset, or describe a new one.`);
					return;
				}
				if (missing(raw.newAssetAreaId)) add('newAssetAreaId', `${L.newAssetAreaId}: choose one.`);
				if (missing(raw.newAssetTag)) add('newAssetTag', `${L.newAssetTag}: enter a tag such as TIC-2104.`);
				else if (typeof raw.newAssetTag === 'string' && !TAG.test(raw.newAssetTag)) {
					add('newAssetTag', `${L.newAssetTag}: 1–40 letters, digits, and . _ / - (starting with a letter or digit).`);
				}
				if (missing(raw.newAssetKind)) add('newAssetKind', `${L.newAssetKind}: choose one of the kinds.`);
				if (missing(raw.newAssetName)) add('newAssetName', `${L.newAssetName}: enter a value.`);
			}
		}, always)
		.transform((v): ModelCreateInput => {
			const raw = v as Raw;
			const asset: ModelCreateInput['asset'] = isNum(raw.assetId)
				? { id: raw.assetId }
				: {
						areaId: raw.newAssetAreaId as number,
						tag: raw.newAssetTag as string,
						kind: raw.newAssetKind as AssetKindValue,
						name: raw.newAssetName as string,
						description: (raw.newAssetDescription as string | undefined) ?? null
					};
			return { title: raw.title as string, asset, revision: toRevisionInput(raw) };
		});
}

/** The edit form of a draft: the revision fields plus `version`, the version the editor started from. */
export function revisionEditSchema(now: () => Date = () => new Date()) {
	return z
		.object(
			{
				...revisionShape,
				version: z.preprocess(toNumber, z.number({ error: `${L.version} is missing; reload the page.` }).int().min(0, `${L.version} is not valid; reload the page.`))
			},
			{ error: 'The revision must be an object of fields.' }
		)
		.superRefine((v, ctx) => checkRevision(v as Raw, ctx, now), always)
		.transform((v) => ({ version: (v as Raw).version as number, revision: toRevisionInput(v as Raw) }));
}

// ── Review actions ───────────────────────────────────────────────────────────────────────────

const optionalVersion = z.preprocess(toNumber, z.number({ error: `${L.version} is not valid; reload the page.` }).int().min(0).optional());

/** Approve: an optional comment (compulsory for large changes — the service says when). */
export const approveSchema = z.object({ comment: optionalText(L.comment, 4000), version: optionalVersion });
/** Send back: a comment saying what needs to change. */
export const requestChangesSchema = z.object({ comment: requiredText(L.comment, 4000), version: optionalVersion });
/** Submit for review: the version the author last saw. */
export const submitSchema = z.object({ version: optionalVersion });
/** Withdraw a model: the reason, kept with the model. */
export const withdrawSchema = z.object({ reason: requiredText(L.reason, 2000) });
/** Discard an open revision: an optional note. */
export const discardSchema = z.object({ comment: optionalText(L.comment, 2000) });
/** Revalidate an unchanged model: the new revalidate-by date and an optional comment. */
export const revalidateSchema = z.object({ revalidateBy: requiredDate(L.revalidateBy), comment: optionalText(L.comment, 4000) });

// ── Errors ───────────────────────────────────────────────────────────────────────────────────

/** Field name → first message for that field (`_form` for errors not tied to a field). */
export function fieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? String(issue.path[0]) : '_form';
		if (!(key in out)) out[key] = issue.message;
	}
	return out;
}

/** Plain object from FormData (last value wins), for `schema.safeParse(formValues(data))`. */
export function formValues(data: FormData): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of data.entries()) if (typeof v === 'string') out[k] = v;
	return out;
}
