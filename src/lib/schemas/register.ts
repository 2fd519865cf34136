/**
 * The register's list query — filters, sort and page — as it appears in the URL. One schema for
 * the page (which falls back to defaults and says which field it ignored) and the JSON API (which
 * answers 400 naming the field). Pure: usable on the server and in components.
 */
import { z } from 'zod';

/** Rows per page of the register. */
export const REGISTER_PAGE_SIZE = 25;

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

export const STRUCTURE_VALUES = ['fopdt', 'sopdt', 'ipdt', 'second_order', 'rational'] as const;

/**
 * Register states, derived per model: `approved` (has an approved revision, not withdrawn),
 * `in_review` (a revision waits for review), `draft` (never approved), `withdrawn` (retired).
 * Without a state filter the register shows every model that is not withdrawn.
 */
export const REGISTER_STATE_VALUES = ['approved', 'in_review', 'draft', 'withdrawn'] as const;
export type RegisterState = (typeof REGISTER_STATE_VALUES)[number];

/** The sortable columns of the register, by URL name. */
export const REGISTER_SORT_VALUES = [
	'tag',
	'asset',
	'title',
	'site',
	'area',
	'structure',
	'gain',
	'tau',
	'theta',
	'state',
	'revalidate',
	'approved'
] as const;
export type RegisterSort = (typeof REGISTER_SORT_VALUES)[number];

const id = z.coerce
	.number({ message: 'must be a number' })
	.int('must be a whole number')
	.positive('must be a positive id')
	.max(4_294_967_295, 'is too large');

const FIELDS = {
	q: z.string().trim().max(100, 'must be at most 100 characters'),
	site: id,
	area: id,
	kind: z.enum(ASSET_KIND_VALUES, { message: 'is not an asset kind' }),
	structure: z.enum(STRUCTURE_VALUES, { message: 'is not a model structure' }),
	state: z.enum(REGISTER_STATE_VALUES, { message: 'is not a register state' }),
	stale: z.enum(['1'], { message: 'must be 1 (only overdue models) or absent' }),
	sort: z.enum(REGISTER_SORT_VALUES, { message: 'is not a sortable column' }),
	dir: z.enum(['asc', 'desc'], { message: 'must be asc or desc' }),
	page: z.coerce
		.number({ message: 'must be a number' })
		.int('must be a whole number')
		.min(1, 'must be 1 or more')
		.max(100_000, 'is too large')
} as const;

type FieldName = keyof typeof FIELDS;
const FIELD_NAMES = Object.keys(FIELDS) as FieldName[];

/** A validated register query; absent filters are undefined. */
export interface RegisterQuery {
	q?: string;
	site?: number;
	area?: number;
	kind?: (typeof ASSET_KIND_VALUES)[number];
	structure?: (typeof STRUCTURE_VALUES)[number];
	state?: RegisterState;
	stale?: true;
	sort: RegisterSort;
	dir: 'asc' | 'desc';
	page: number;
}

export const DEFAULT_SORT: RegisterSort = 'tag';
export const DEFAULT_DIR = 'asc' as const;

/** A query parameter that could not be used, with the reason. */
export interface FieldIssue {
	field: FieldName;
	message: string;
}

/**
 * Reads the register query from URL parameters. Empty values mean "not set". Every field is
 * checked on its own: a bad one is reported in `issues` (field named) and left at its default, so
 * the page can still show the rest; the API answers 400 when `issues` is not empty.
 * Unknown parameters are ignored.
 */
export function parseRegisterQuery(params: URLSearchParams): { query: RegisterQuery; issues: FieldIssue[] } {
	const query: RegisterQuery = { sort: DEFAULT_SORT, dir: DEFAULT_DIR, page: 1 };
	const issues: FieldIssue[] = [];
	for (const field of FIELD_NAMES) {
		const all = params.getAll(field);
		if (all.length === 0) continue;
		if (all.length > 1) {
			issues.push({ field, message: `${field} is given more than once` });
			continue;
		}
		const raw = all[0];
		if (raw.trim() === '') continue;
		const parsed = FIELDS[field].safeParse(raw);
		if (!parsed.success) {
			issues.push({ field, message: `${field} ${parsed.error.issues[0]?.message ?? 'is not valid'}` });
			continue;
		}
		const value = parsed.data;
		if (field === 'stale') query.stale = true;
		else if (field === 'q') {
			if (value !== '') query.q = value as string;
		} else (query as unknown as Record<string, unknown>)[field] = value;
	}
	return { query, issues };
}

/**
 * The URL search string of a query (with `?`, or '' when everything is default), leaving out
 * defaults so links stay short. `changes` override fields; `undefined` removes a filter.
 * Changing any filter or the sort goes back to page 1 unless `page` is given.
 */
export function registerSearch(query: RegisterQuery, changes: Partial<RegisterQuery> = {}): string {
	const resetsPage = Object.keys(changes).some((k) => k !== 'page');
	const next: RegisterQuery = { ...query, ...changes };
	if (resetsPage && changes.page === undefined) next.page = 1;
	const p = new URLSearchParams();
	if (next.q) p.set('q', next.q);
	if (next.site) p.set('site', String(next.site));
	if (next.area) p.set('area', String(next.area));
	if (next.kind) p.set('kind', next.kind);
	if (next.structure) p.set('structure', next.structure);
	if (next.state) p.set('state', next.state);
	if (next.stale) p.set('stale', '1');
	if (next.sort !== DEFAULT_SORT || next.dir !== DEFAULT_DIR) p.set('sort', next.sort);
	if (next.dir !== DEFAULT_DIR) p.set('dir', next.dir);
	if (next.page > 1) p.set('page', String(next.page));
	const s = p.toString();
	return s ? `?${s}` : '';
}

/** True when any filter (not sort or page) is set. */
export function hasFilters(query: RegisterQuery): boolean {
	return Boolean(query.q || query.site || query.area || query.kind || query.structure || query.state || query.stale);
}
