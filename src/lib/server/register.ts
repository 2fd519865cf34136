/**
 * The register: the list of plant models with their asset, place, structure, key parameters,
 * state and revalidation, filtered, sorted and paged in the database with ONE query (joins with
 * the shown revision, the in-review flag as an indexed EXISTS, the total as a window count).
 * Returns plain DTOs. Visibility follows the role: viewers see models with an approved revision
 * only; engineers and above also see never-approved models, as drafts (their newest revision).
 * Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { assertCan, can, type Role } from '../auth/roles';
import { REGISTER_PAGE_SIZE, type RegisterQuery, type RegisterSort, type RegisterState } from '../schemas/register';
import { todayUtc } from '../format';

/** Who is asking: the signed-in person's id and current role. */
export interface Actor {
	id: number;
	role: Role;
}

/** One row of the register. Times in seconds; dates `YYYY-MM-DD`; timestamps ISO 8601 UTC. */
export interface RegisterRow {
	id: number;
	title: string;
	asset: { id: number; tag: string; name: string; kind: string };
	site: { id: number; code: string; name: string };
	area: { id: number; code: string; name: string };
	/** The revision shown: the approved one, or for never-approved models the newest. */
	revision: {
		id: number;
		no: number;
		state: string;
		structure: string;
		/** Structure parameters as stored (times in s, ωn in rad/s, integrating gain per s). */
		parameters: Record<string, number>;
		/** Process gain ΔPV/ΔMV (integrating: per second); null when the structure has none. */
		gain: number | null;
		/** The model has a pole at s = 0 (IPDT, or a rational model whose denominator ends in 0): its gain is a rate. */
		integrating: boolean;
		timeConstantSeconds: number | null;
		delaySeconds: number;
		timeUnit: 's' | 'min';
		mvUnit: string;
		pvUnit: string;
		revalidateBy: string | null;
	};
	state: RegisterState;
	/** A revision of this model waits for review. */
	inReview: boolean;
	/** The revalidate-by date has passed (and the model is not withdrawn). */
	stale: boolean;
	lastApprovedAt: string | null;
}

export interface RegisterPage {
	rows: RegisterRow[];
	total: number;
	page: number;
	pageCount: number;
	pageSize: number;
	/** The date the stale flags were computed for (UTC). */
	today: string;
}

/** Extra, non-URL filters used by other pages (the asset page lists one asset's models). */
export interface RegisterScope {
	assetId?: number;
	/** Rows per page; the register uses REGISTER_PAGE_SIZE. */
	pageSize?: number;
	/** "Today" for the stale flag, `YYYY-MM-DD` (tests pin it). */
	today?: string;
}

const STATE_EXPR = `CASE
	WHEN pm.status = 'withdrawn' THEN 'withdrawn'
	WHEN pm.approved_revision_id IS NULL THEN 'draft'
	ELSE 'approved' END`;

const IN_REVIEW_EXPR = `EXISTS (SELECT 1 FROM model_revisions x WHERE x.model_id = pm.id AND x.state = 'in_review')`;

/**
 * State order for sorting: never approved first (drafts, then drafts in review), then approved
 * with a revision in review, approved, and withdrawn last.
 */
const STATE_RANK_EXPR = `(CASE
	WHEN pm.status = 'withdrawn' THEN 4
	WHEN pm.approved_revision_id IS NULL THEN (CASE WHEN ${IN_REVIEW_EXPR} THEN 1 ELSE 0 END)
	WHEN ${IN_REVIEW_EXPR} THEN 2
	ELSE 3 END)`;

/** When the shown revision was approved; NULL for never-approved models. */
const APPROVED_AT_EXPR = 'IF(pm.approved_revision_id IS NULL, NULL, r.approved_at)';

/** SQL sort keys per column; nullable keys sort their NULLs last in both directions. */
const SORT_KEYS: Record<RegisterSort, { exprs: string[]; nullable?: boolean }> = {
	tag: { exprs: ['a.tag'] },
	asset: { exprs: ['a.name'] },
	title: { exprs: ['pm.title'] },
	site: { exprs: ['s.name', 'ar.name'] },
	area: { exprs: ['ar.name'] },
	// ENUM columns sort by declaration order: fopdt, sopdt, ipdt, second_order, rational.
	structure: { exprs: ['r.structure'] },
	gain: { exprs: ['r.gain'], nullable: true },
	tau: { exprs: ['r.time_constant_s'], nullable: true },
	theta: { exprs: ['r.delay_s'] },
	state: { exprs: [STATE_RANK_EXPR] },
	revalidate: { exprs: ['r.revalidate_by'], nullable: true },
	approved: { exprs: [APPROVED_AT_EXPR], nullable: true }
};

/** Escapes LIKE wildcards so a user's `%` or `_` matches literally. */
export function likePattern(text: string): string {
	return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

interface RawRow {
	id: number;
	title: string;
	status: string;
	asset_id: number;
	tag: string;
	asset_name: string;
	kind: string;
	site_id: number;
	site_code: string;
	site_name: string;
	area_id: number;
	area_code: string;
	area_name: string;
	revision_id: number;
	revision_no: number;
	revision_state: string;
	structure: string;
	parameters: string | Record<string, number>;
	den: string | number[];
	gain: number | null;
	time_constant_s: number | null;
	delay_s: number;
	time_unit: 's' | 'min';
	mv_unit: string;
	pv_unit: string;
	revalidate_by: string | null;
	approved_at_of_model: Date | string | null;
	register_state: RegisterState;
	in_review: number | boolean;
	is_stale: number | boolean;
	total: number | bigint | string;
}

function parseJson(v: string | Record<string, number> | null): Record<string, number> {
	if (v === null) return {};
	if (typeof v !== 'string') return v;
	try {
		const parsed = JSON.parse(v) as unknown;
		return parsed && typeof parsed === 'object' ? (parsed as Record<string, number>) : {};
	} catch {
		return {};
	}
}

/**
 * True for a model with a free integrator: IPDT by definition, and a rational model whose
 * denominator's constant term is 0 (a pole at s = 0; system type ≥ 1, e.g. Ogata 2010 §5-8).
 */
export function isIntegrating(structure: string, den: string | number[] | null): boolean {
	if (structure === 'ipdt') return true;
	if (structure !== 'rational' || den === null) return false;
	let coefficients: unknown = den;
	if (typeof den === 'string') {
		try {
			coefficients = JSON.parse(den);
		} catch {
			return false;
		}
	}
	return Array.isArray(coefficients) && coefficients.length > 1 && Number(coefficients[coefficients.length - 1]) === 0;
}

function iso(v: Date | string | null): string | null {
	if (v === null) return null;
	const d = v instanceof Date ? v : new Date(`${v.replace(' ', 'T')}Z`);
	return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

function toRow(r: RawRow): RegisterRow {
	return {
		id: Number(r.id),
		title: r.title,
		asset: { id: Number(r.asset_id), tag: r.tag, name: r.asset_name, kind: r.kind },
		site: { id: Number(r.site_id), code: r.site_code, name: r.site_name },
		area: { id: Number(r.area_id), code: r.area_code, name: r.area_name },
		revision: {
			id: Number(r.revision_id),
			no: Number(r.revision_no),
			state: r.revision_state,
			structure: r.structure,
			parameters: parseJson(r.parameters),
			gain: r.gain === null ? null : Number(r.gain),
			integrating: isIntegrating(r.structure, r.den),
			timeConstantSeconds: r.time_constant_s === null ? null : Number(r.time_constant_s),
			delaySeconds: Number(r.delay_s),
			timeUnit: r.time_unit,
			mvUnit: r.mv_unit,
			pvUnit: r.pv_unit,
			revalidateBy: r.revalidate_by
		},
		state: r.register_state,
		inReview: Boolean(Number(r.in_review)),
		stale: Boolean(Number(r.is_stale)),
		lastApprovedAt: iso(r.approved_at_of_model)
	};
}

/**
 * One page of the register for `actor`, filtered and sorted as `query` says (see
 * `parseRegisterQuery`). A page past the end gives the last page. Throws PermissionDenied for a
 * role that may not read models.
 */
export async function listRegister(actor: Actor, query: RegisterQuery, scope: RegisterScope = {}): Promise<RegisterPage> {
	assertCan(actor.role, 'model.read');
	const pageSize = scope.pageSize ?? REGISTER_PAGE_SIZE;
	const today = scope.today ?? todayUtc();
	const where: string[] = [];
	const rep: Record<string, unknown> = { today };

	if (!can(actor.role, 'model.read_draft')) where.push('pm.approved_revision_id IS NOT NULL');
	if (query.state === 'withdrawn') where.push(`pm.status = 'withdrawn'`);
	else {
		where.push(`pm.status <> 'withdrawn'`);
		if (query.state === 'approved') where.push('pm.approved_revision_id IS NOT NULL');
		if (query.state === 'draft') where.push('pm.approved_revision_id IS NULL');
		if (query.state === 'in_review') where.push(IN_REVIEW_EXPR);
	}
	if (query.site) {
		where.push('a.site_id = :site');
		rep.site = query.site;
	}
	if (query.area) {
		where.push('a.area_id = :area');
		rep.area = query.area;
	}
	if (scope.assetId) {
		where.push('pm.asset_id = :assetId');
		rep.assetId = scope.assetId;
	}
	if (query.kind) {
		where.push('a.kind = :kind');
		rep.kind = query.kind;
	}
	if (query.structure) {
		where.push('r.structure = :structure');
		rep.structure = query.structure;
	}
	if (query.stale) where.push('r.revalidate_by < :today');
	if (query.q) {
		where.push(`(a.tag LIKE :q OR a.name LIKE :q OR pm.title LIKE :q)`);
		rep.q = likePattern(query.q);
	}

	const key = SORT_KEYS[query.sort];
	const dir = query.dir === 'desc' ? 'DESC' : 'ASC';
	const order = [
		...key.exprs.flatMap((e) => (key.nullable ? [`(${e}) IS NULL ASC`, `${e} ${dir}`] : [`${e} ${dir}`])),
		'a.tag ASC',
		'pm.id ASC'
	].join(', ');

	// Two levels in one statement: the inner query filters, sorts and pages on narrow columns only
	// (so the sort never drags JSON or text through a temporary table); the outer one fetches the
	// page's rows in full.
	const joins = `
		FROM plant_models pm
		JOIN assets a ON a.id = pm.asset_id
		JOIN sites s ON s.id = a.site_id
		JOIN areas ar ON ar.id = a.area_id`;
	const sql = `
		SELECT pm.id, pm.title, pm.status,
			a.id AS asset_id, a.tag, a.name AS asset_name, a.kind,
			s.id AS site_id, s.code AS site_code, s.name AS site_name,
			ar.id AS area_id, ar.code AS area_code, ar.name AS area_name,
			r.id AS revision_id, r.revision_no, r.state AS revision_state, r.structure, r.parameters, r.den,
			r.gain, r.time_constant_s, r.delay_s, r.time_unit, r.mv_unit, r.pv_unit,
			DATE_FORMAT(r.revalidate_by, '%Y-%m-%d') AS revalidate_by,
			${APPROVED_AT_EXPR} AS approved_at_of_model,
			${STATE_EXPR} AS register_state,
			${IN_REVIEW_EXPR} AS in_review,
			(pm.status <> 'withdrawn' AND r.revalidate_by IS NOT NULL AND r.revalidate_by < :today) AS is_stale,
			pg.total
		FROM (
			SELECT pm.id AS model_id, r.id AS shown_revision_id, COUNT(*) OVER () AS total
			${joins}
			JOIN model_revisions r ON r.id = COALESCE(pm.approved_revision_id,
				(SELECT l.id FROM model_revisions l WHERE l.model_id = pm.id ORDER BY l.revision_no DESC LIMIT 1))
			WHERE ${where.join(' AND ')}
			ORDER BY ${order}
			LIMIT :limit OFFSET :offset
		) pg
		JOIN plant_models pm ON pm.id = pg.model_id
		JOIN model_revisions r ON r.id = pg.shown_revision_id
		JOIN assets a ON a.id = pm.asset_id
		JOIN sites s ON s.id = a.site_id
		JOIN areas ar ON ar.id = a.area_id
		ORDER BY ${order}`;

	const run = (page: number) =>
		sequelize().query<RawRow>(sql, {
			type: QueryTypes.SELECT,
			replacements: { ...rep, limit: pageSize, offset: (page - 1) * pageSize }
		});

	let page = query.page;
	let raw = await run(page);
	if (raw.length === 0 && page > 1) {
		// Past the end: one more round trip to find the last page (the usual path stays one query).
		const first = await run(1);
		const total = first.length ? Number(first[0].total) : 0;
		page = Math.max(1, Math.ceil(total / pageSize));
		raw = page === 1 ? first : await run(page);
	}
	const total = raw.length ? Number(raw[0].total) : 0;
	return {
		rows: raw.map(toRow),
		total,
		page,
		pageCount: Math.max(1, Math.ceil(total / pageSize)),
		pageSize,
		today
	};
}
