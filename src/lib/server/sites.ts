/**
 * Read side of the ISA-95 hierarchy: sites with their areas and the counts the pages show, and
 * the options of the register's site/area filters. Counts of models follow the same visibility
 * rule as the register (viewers count approved models only; withdrawn models are not counted).
 * Every function is one SQL query. Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { assertCan, can } from '../auth/roles';
import { NotFound } from './errors';
import type { Actor } from './register';

export interface SiteSummary {
	id: number;
	code: string;
	name: string;
	description: string | null;
	areaCount: number;
	assetCount: number;
	modelCount: number;
	staleCount: number;
}

export interface AreaSummary {
	id: number;
	code: string;
	name: string;
	description: string | null;
	assetCount: number;
	modelCount: number;
	staleCount: number;
}

export interface AreaAsset {
	id: number;
	tag: string;
	name: string;
	kind: string;
	description: string | null;
	modelCount: number;
	inReviewCount: number;
	staleCount: number;
}

export interface AreaDetail {
	id: number;
	code: string;
	name: string;
	description: string | null;
	site: { id: number; code: string; name: string };
	assets: AreaAsset[];
}

export interface SiteDetail {
	id: number;
	code: string;
	name: string;
	description: string | null;
	areas: AreaSummary[];
}

/** Filter options of the register: every site and area, ordered by name. */
export interface HierarchyOptions {
	sites: Array<{ id: number; code: string; name: string }>;
	areas: Array<{ id: number; code: string; name: string; siteId: number }>;
}

/** SQL condition for a model row `pm` counted for this actor (visible, not withdrawn). */
function visibleModel(actor: Actor): string {
	return can(actor.role, 'model.read_draft')
		? `pm.status <> 'withdrawn'`
		: `pm.status <> 'withdrawn' AND pm.approved_revision_id IS NOT NULL`;
}

/** Stale: the shown revision's revalidate-by date is before :today. */
const STALE_EXPR = `EXISTS (SELECT 1 FROM model_revisions sr WHERE sr.id = COALESCE(pm.approved_revision_id,
	(SELECT l.id FROM model_revisions l WHERE l.model_id = pm.id ORDER BY l.revision_no DESC LIMIT 1))
	AND sr.revalidate_by < :today)`;

const n = (v: unknown) => Number(v ?? 0);

/** Every site with its area, asset, model and stale-model counts, by name. */
export async function listSites(actor: Actor, today: string): Promise<SiteSummary[]> {
	assertCan(actor.role, 'model.read');
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT s.id, s.code, s.name, s.description,
			(SELECT COUNT(*) FROM areas x WHERE x.site_id = s.id) AS area_count,
			(SELECT COUNT(*) FROM assets y WHERE y.site_id = s.id) AS asset_count,
			COUNT(pm.id) AS model_count,
			COALESCE(SUM(${STALE_EXPR}), 0) AS stale_count
		FROM sites s
		LEFT JOIN assets a ON a.site_id = s.id
		LEFT JOIN plant_models pm ON pm.asset_id = a.id AND ${visibleModel(actor)}
		GROUP BY s.id
		ORDER BY s.name, s.id`,
		{ type: QueryTypes.SELECT, replacements: { today } }
	);
	return rows.map((r) => ({
		id: n(r.id),
		code: String(r.code),
		name: String(r.name),
		description: (r.description as string | null) ?? null,
		areaCount: n(r.area_count),
		assetCount: n(r.asset_count),
		modelCount: n(r.model_count),
		staleCount: n(r.stale_count)
	}));
}

/** One site with its areas and their counts; NotFound when there is no such site. */
export async function getSite(actor: Actor, siteId: number, today: string): Promise<SiteDetail> {
	assertCan(actor.role, 'model.read');
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT s.id AS site_id, s.code AS site_code, s.name AS site_name, s.description AS site_description,
			ar.id, ar.code, ar.name, ar.description,
			(SELECT COUNT(*) FROM assets y WHERE y.area_id = ar.id) AS asset_count,
			COUNT(pm.id) AS model_count,
			COALESCE(SUM(${STALE_EXPR}), 0) AS stale_count
		FROM sites s
		LEFT JOIN areas ar ON ar.site_id = s.id
		LEFT JOIN assets a ON a.area_id = ar.id
		LEFT JOIN plant_models pm ON pm.asset_id = a.id AND ${visibleModel(actor)}
		WHERE s.id = :siteId
		GROUP BY s.id, ar.id
		ORDER BY ar.name, ar.id`,
		{ type: QueryTypes.SELECT, replacements: { siteId, today } }
	);
	if (rows.length === 0) throw new NotFound('There is no site with this id.');
	const first = rows[0];
	return {
		id: n(first.site_id),
		code: String(first.site_code),
		name: String(first.site_name),
		description: (first.site_description as string | null) ?? null,
		areas: rows
			.filter((r) => r.id !== null)
			.map((r) => ({
				id: n(r.id),
				code: String(r.code),
				name: String(r.name),
				description: (r.description as string | null) ?? null,
				assetCount: n(r.asset_count),
				modelCount: n(r.model_count),
				staleCount: n(r.stale_count)
			}))
	};
}

/** One area with its site and its assets (with model counts); NotFound when there is no such area. */
export async function getArea(actor: Actor, areaId: number, today: string): Promise<AreaDetail> {
	assertCan(actor.role, 'model.read');
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT ar.id AS area_id, ar.code AS area_code, ar.name AS area_name, ar.description AS area_description,
			s.id AS site_id, s.code AS site_code, s.name AS site_name,
			a.id, a.tag, a.name, a.kind, a.description,
			COUNT(pm.id) AS model_count,
			COALESCE(SUM(EXISTS (SELECT 1 FROM model_revisions x WHERE x.model_id = pm.id AND x.state = 'in_review')), 0) AS in_review_count,
			COALESCE(SUM(${STALE_EXPR}), 0) AS stale_count
		FROM areas ar
		JOIN sites s ON s.id = ar.site_id
		LEFT JOIN assets a ON a.area_id = ar.id
		LEFT JOIN plant_models pm ON pm.asset_id = a.id AND ${visibleModel(actor)}
		WHERE ar.id = :areaId
		GROUP BY ar.id, a.id
		ORDER BY a.tag, a.id`,
		{ type: QueryTypes.SELECT, replacements: { areaId, today } }
	);
	if (rows.length === 0) throw new NotFound('There is no area with this id.');
	const first = rows[0];
	return {
		id: n(first.area_id),
		code: String(first.area_code),
		name: String(first.area_name),
		description: (first.area_description as string | null) ?? null,
		site: { id: n(first.site_id), code: String(first.site_code), name: String(first.site_name) },
		assets: rows
			.filter((r) => r.id !== null)
			.map((r) => ({
				id: n(r.id),
				tag: String(r.tag),
				name: String(r.name),
				kind: String(r.kind),
				description: (r.description as string | null) ?? null,
				modelCount: n(r.model_count),
				inReviewCount: n(r.in_review_count),
				staleCount: n(r.stale_count)
			}))
	};
}

/** The site and area options of the register filters. */
export async function hierarchyOptions(actor: Actor): Promise<HierarchyOptions> {
	assertCan(actor.role, 'model.read');
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT s.id AS site_id, s.code AS site_code, s.name AS site_name, ar.id, ar.code, ar.name
		FROM sites s LEFT JOIN areas ar ON ar.site_id = s.id
		ORDER BY s.name, s.id, ar.name, ar.id`,
		{ type: QueryTypes.SELECT }
	);
	const sites = new Map<number, { id: number; code: string; name: string }>();
	const areas: HierarchyOptions['areas'] = [];
	for (const r of rows) {
		const siteId = n(r.site_id);
		if (!sites.has(siteId)) sites.set(siteId, { id: siteId, code: String(r.site_code), name: String(r.site_name) });
		if (r.id !== null) areas.push({ id: n(r.id), code: String(r.code), name: String(r.name), siteId });
	}
	return { sites: [...sites.values()], areas };
}
