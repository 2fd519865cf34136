/**
 * The choices of the model form's asset picker: every site with its areas, and every asset with
 * its place (site, area), tag, kind and name — one query each, ordered for grouped lists. Readers
 * who may create models only (engineers and reviewers; administrators may create assets too).
 * Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { assertCan, can, PermissionDenied } from '../auth/roles';
import { hierarchyOptions, type HierarchyOptions } from './sites';
import type { Actor } from './register';

/** One asset as the picker lists it. */
export interface AssetOption {
	id: number;
	tag: string;
	name: string;
	kind: string;
	siteId: number;
	areaId: number;
}

/** Sites, areas and assets for the picker. */
export interface AssetPickerOptions extends HierarchyOptions {
	assets: AssetOption[];
}

/** Most assets offered in one list; a plant with more would need a search box instead. */
export const MAX_ASSET_OPTIONS = 5000;

/** Everything the asset picker offers, for someone who may create models (PermissionDenied otherwise). */
export async function assetPickerOptions(actor: Actor): Promise<AssetPickerOptions> {
	if (!can(actor.role, 'model.create') && !can(actor.role, 'revision.propose')) throw new PermissionDenied('model.create');
	assertCan(actor.role, 'model.read');
	const [hierarchy, rows] = await Promise.all([
		hierarchyOptions(actor),
		sequelize().query<Record<string, unknown>>(
			`SELECT a.id, a.tag, a.name, a.kind, a.site_id, a.area_id
			FROM assets a JOIN areas ar ON ar.id = a.area_id JOIN sites s ON s.id = a.site_id
			ORDER BY s.name, ar.name, a.tag, a.id
			LIMIT ${MAX_ASSET_OPTIONS}`,
			{ type: QueryTypes.SELECT }
		)
	]);
	return {
		...hierarchy,
		assets: rows.map((r) => ({
			id: Number(r.id),
			tag: String(r.tag),
			name: String(r.name),
			kind: String(r.kind),
			siteId: Number(r.site_id),
			areaId: Number(r.area_id)
		}))
	};
}
