/**
 * Assets — the read side: one asset's facts with its place in the hierarchy, its models (the
 * register's rows for this asset, same visibility rules, withdrawn ones included) and the tuning
 * sets of those models. Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { assertCan } from '../auth/roles';
import { NotFound } from './errors';
import { listRegister, type Actor, type RegisterRow } from './register';
import { listTuningSets, type TuningSetDto } from './models';
import { todayUtc } from '../format';

export interface AssetPageDto {
	id: number;
	tag: string;
	name: string;
	kind: string;
	description: string | null;
	site: { id: number; code: string; name: string };
	area: { id: number; code: string; name: string };
	createdAt: string | null;
	models: RegisterRow[];
	withdrawnModels: RegisterRow[];
	tuningSets: TuningSetDto[];
	today: string;
}

/** Most models listed on one asset page (an asset has a handful; the register pages the rest). */
const ASSET_MODELS_LIMIT = 200;

/** Everything the asset page shows; NotFound when there is no such asset. */
export async function getAssetPage(actor: Actor, assetId: number, today: string = todayUtc()): Promise<AssetPageDto> {
	assertCan(actor.role, 'model.read');
	const rows = await sequelize().query<Record<string, unknown>>(
		`SELECT a.id, a.tag, a.name, a.kind, a.description, a.created_at,
			s.id AS site_id, s.code AS site_code, s.name AS site_name,
			ar.id AS area_id, ar.code AS area_code, ar.name AS area_name
		FROM assets a JOIN sites s ON s.id = a.site_id JOIN areas ar ON ar.id = a.area_id
		WHERE a.id = :assetId`,
		{ type: QueryTypes.SELECT, replacements: { assetId } }
	);
	const a = rows[0];
	if (!a) throw new NotFound('There is no asset with this id.');
	const scope = { assetId, pageSize: ASSET_MODELS_LIMIT, today };
	const [current, withdrawn, tuningSets] = await Promise.all([
		listRegister(actor, { sort: 'title', dir: 'asc', page: 1 }, scope),
		listRegister(actor, { sort: 'title', dir: 'asc', page: 1, state: 'withdrawn' }, scope),
		listTuningSets(actor, { assetId })
	]);
	const created = a.created_at instanceof Date ? a.created_at.toISOString() : null;
	return {
		id: Number(a.id),
		tag: String(a.tag),
		name: String(a.name),
		kind: String(a.kind),
		description: a.description === null ? null : String(a.description),
		site: { id: Number(a.site_id), code: String(a.site_code), name: String(a.site_name) },
		area: { id: Number(a.area_id), code: String(a.area_code), name: String(a.area_name) },
		createdAt: created,
		models: current.rows,
		withdrawnModels: withdrawn.rows,
		tuningSets,
		today
	};
}
