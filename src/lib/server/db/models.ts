/**
 * Sequelize models of the tables created by the migrations. Only services under
 * `src/lib/server/` use these; routes call the services. Call `initModels()` before use
 * (idempotent). The schema itself is owned by the migrations: never `sync()` outside throwaway tests.
 */
import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';
import { sequelize } from './connection';
import { initWorkflowModels } from './models-workflow';

export type Role = 'viewer' | 'engineer' | 'reviewer' | 'admin';
export type Structure = 'fopdt' | 'sopdt' | 'ipdt' | 'second_order' | 'rational';
export type RevisionState =
	| 'draft'
	| 'in_review'
	| 'changes_requested'
	| 'approved'
	| 'superseded'
	| 'withdrawn';
export type AssetKind =
	| 'pump'
	| 'oven'
	| 'heat_exchanger'
	| 'tank'
	| 'chiller'
	| 'dryer'
	| 'fan'
	| 'conveyor'
	| 'boiler'
	| 'valve'
	| 'other';
export type IdentificationMethod =
	| 'step_test'
	| 'two_point'
	| 'least_squares'
	| 'datasheet'
	| 'first_principles';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
	declare id: CreationOptional<number>;
	declare email: string;
	declare name: string;
	declare role: Role;
	declare password_hash: string;
	declare must_change_password: CreationOptional<boolean>;
	declare active: CreationOptional<boolean>;
	declare digest_opt_out: CreationOptional<boolean>;
	declare last_sign_in_at: Date | null;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class SignInThrottle extends Model<
	InferAttributes<SignInThrottle>,
	InferCreationAttributes<SignInThrottle>
> {
	declare key_hash: string;
	declare failures: number;
	declare last_failure_at: Date | null;
	declare locked_until: Date | null;
}

export class Site extends Model<InferAttributes<Site>, InferCreationAttributes<Site>> {
	declare id: CreationOptional<number>;
	declare code: string;
	declare name: string;
	declare description: string | null;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class Area extends Model<InferAttributes<Area>, InferCreationAttributes<Area>> {
	declare id: CreationOptional<number>;
	declare site_id: ForeignKey<Site['id']>;
	declare code: string;
	declare name: string;
	declare description: string | null;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class Asset extends Model<InferAttributes<Asset>, InferCreationAttributes<Asset>> {
	declare id: CreationOptional<number>;
	declare site_id: ForeignKey<Site['id']>;
	declare area_id: ForeignKey<Area['id']>;
	declare tag: string;
	declare kind: AssetKind;
	declare name: string;
	declare description: string | null;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class PlantModel extends Model<InferAttributes<PlantModel>, InferCreationAttributes<PlantModel>> {
	declare id: CreationOptional<number>;
	declare asset_id: ForeignKey<Asset['id']>;
	declare title: string;
	declare status: CreationOptional<'draft' | 'active' | 'withdrawn'>;
	declare approved_revision_id: number | null;
	declare withdrawn_at: Date | null;
	declare withdrawn_by: number | null;
	declare withdrawn_reason: string | null;
	declare created_by: ForeignKey<User['id']>;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

/** Structure-specific parameters as entered (times in seconds). */
export interface ModelParameters {
	k?: number;
	tau?: number;
	tau2?: number;
	zeta?: number;
	wn?: number;
	theta?: number;
}

export class ModelRevision extends Model<
	InferAttributes<ModelRevision>,
	InferCreationAttributes<ModelRevision>
> {
	declare id: CreationOptional<number>;
	declare model_id: ForeignKey<PlantModel['id']>;
	declare revision_no: number;
	declare state: CreationOptional<RevisionState>;
	declare structure: Structure;
	declare parameters: ModelParameters;
	declare num: number[];
	declare den: number[];
	declare delay_s: number;
	declare gain: number | null;
	declare time_constant_s: number | null;
	declare time_unit: 's' | 'min';
	declare mv_name: string;
	declare mv_unit: string;
	declare mv_min: number;
	declare mv_max: number;
	declare pv_name: string;
	declare pv_unit: string;
	declare pv_min: number;
	declare pv_max: number;
	declare op_mv: number | null;
	declare op_pv: number | null;
	declare op_note: string | null;
	declare method: IdentificationMethod;
	declare test_date: string | null;
	declare data_attachment_id: number | null;
	declare fit_r2: number | null;
	declare fit_rmse: number | null;
	declare valid_range: string | null;
	declare revalidate_by: string | null;
	declare change_summary: string | null;
	declare review_comment: string | null;
	declare author_id: ForeignKey<User['id']>;
	declare reviewer_id: number | null;
	declare submitted_at: Date | null;
	declare reviewed_at: Date | null;
	declare approved_at: Date | null;
	/** The approved revision this one started from (null for a model's first revision). */
	declare base_revision_id: CreationOptional<number | null>;
	/** An unchanged model re-approved with a new revalidate-by date. */
	declare is_revalidation: CreationOptional<boolean>;
	declare version: CreationOptional<number>;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class RevisionContributor extends Model<
	InferAttributes<RevisionContributor>,
	InferCreationAttributes<RevisionContributor>
> {
	declare revision_id: number;
	declare user_id: number;
	declare created_at: CreationOptional<Date>;
}

export class TuningSet extends Model<InferAttributes<TuningSet>, InferCreationAttributes<TuningSet>> {
	declare id: CreationOptional<number>;
	declare model_id: ForeignKey<PlantModel['id']>;
	declare model_revision_id: ForeignKey<ModelRevision['id']>;
	declare loop_tag: string;
	declare state: CreationOptional<RevisionState>;
	declare controller_type: 'P' | 'PI' | 'PD' | 'PID';
	declare form: 'ideal' | 'series' | 'parallel';
	declare kp: number;
	declare ti_s: number | null;
	declare td_s: number | null;
	declare filter_n: number | null;
	declare weight_b: number | null;
	declare weight_c: number | null;
	declare rule: string | null;
	declare rule_parameter: number | null;
	declare predicted: Record<string, unknown> | null;
	declare notes: string | null;
	declare review_comment: string | null;
	declare author_id: ForeignKey<User['id']>;
	declare reviewer_id: number | null;
	declare submitted_at: Date | null;
	declare reviewed_at: Date | null;
	declare approved_at: Date | null;
	declare version: CreationOptional<number>;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class Attachment extends Model<InferAttributes<Attachment>, InferCreationAttributes<Attachment>> {
	declare id: CreationOptional<number>;
	declare model_id: number | null;
	declare revision_id: number | null;
	declare kind: 'datasheet' | 'step_test' | 'image' | 'other';
	declare filename: string;
	declare media_type: string;
	declare size_bytes: number;
	declare sha256: string;
	declare storage_key: string;
	declare uploaded_by: number;
	declare created_at: CreationOptional<Date>;
}

export class Note extends Model<InferAttributes<Note>, InferCreationAttributes<Note>> {
	declare id: CreationOptional<number>;
	declare model_id: ForeignKey<PlantModel['id']>;
	declare title: string;
	declare body_md: string;
	declare author_id: ForeignKey<User['id']>;
	declare version: CreationOptional<number>;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
	declare id: CreationOptional<number>;
	declare at: Date;
	declare actor_id: number | null;
	declare actor_email: string | null;
	declare action: string;
	declare entity_type: string;
	declare entity_id: string | null;
	declare before: unknown;
	declare after: unknown;
	declare ip: string | null;
}

export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
	declare id: CreationOptional<number>;
	declare user_id: number;
	declare name: string;
	declare token_hash: string;
	declare prefix: string;
	declare last_used_at: Date | null;
	declare expires_at: Date | null;
	declare revoked_at: Date | null;
	declare created_at: CreationOptional<Date>;
}

/** JSON columns come back from MariaDB as strings: parse them on read. */
function jsonColumn(name: string, allowNull: boolean) {
	return {
		type: DataTypes.JSON,
		allowNull,
		get(this: Model) {
			const raw = this.getDataValue(name) as unknown;
			if (typeof raw === 'string') {
				try {
					return JSON.parse(raw);
				} catch {
					return raw;
				}
			}
			return raw;
		}
	};
}

const ROLE_VALUES = ['viewer', 'engineer', 'reviewer', 'admin'];
const STATE_VALUES = ['draft', 'in_review', 'changes_requested', 'approved', 'superseded', 'withdrawn'];
const pk = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const ts = { created_at: DataTypes.DATE(3), updated_at: DataTypes.DATE(3) };
const common = (sequelizeInstance: Sequelize, tableName: string) => ({
	sequelize: sequelizeInstance,
	tableName,
	underscored: true,
	createdAt: 'created_at',
	updatedAt: 'updated_at'
});

let initialised = false;

/** Define every model on the shared connection (once). */
export function initModels(): void {
	if (initialised) return;
	const s = sequelize();
	User.init(
		{
			id: pk,
			email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
			name: { type: DataTypes.STRING(120), allowNull: false },
			role: { type: DataTypes.ENUM(...ROLE_VALUES), allowNull: false },
			password_hash: { type: DataTypes.STRING(100), allowNull: false },
			must_change_password: { type: DataTypes.BOOLEAN, defaultValue: false },
			active: { type: DataTypes.BOOLEAN, defaultValue: true },
			digest_opt_out: { type: DataTypes.BOOLEAN, defaultValue: false },
			last_sign_in_at: { type: DataTypes.DATE(3), allowNull: true },
			...ts
		},
		common(s, 'users')
	);
	SignInThrottle.init(
		{
			key_hash: { type: DataTypes.CHAR(64), primaryKey: true },
			failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
			last_failure_at: { type: DataTypes.DATE(3), allowNull: true },
			locked_until: { type: DataTypes.DATE(3), allowNull: true }
		},
		{ sequelize: s, tableName: 'sign_in_throttle', timestamps: false }
	);
	Site.init(
		{
			id: pk,
			code: { type: DataTypes.STRING(32), allowNull: false },
			name: { type: DataTypes.STRING(120), allowNull: false },
			description: { type: DataTypes.TEXT, allowNull: true },
			...ts
		},
		common(s, 'sites')
	);
	Area.init(
		{
			id: pk,
			code: { type: DataTypes.STRING(32), allowNull: false },
			name: { type: DataTypes.STRING(120), allowNull: false },
			description: { type: DataTypes.TEXT, allowNull: true },
			...ts
		},
		common(s, 'areas')
	);
	Asset.init(
		{
			id: pk,
			tag: { type: DataTypes.STRING(40), allowNull: false },
			kind: { type: DataTypes.STRING(32), allowNull: false },
			name: { type: DataTypes.STRING(160), allowNull: false },
			description: { type: DataTypes.TEXT, allowNull: true },
			...ts
		},
		common(s, 'assets')
	);
	PlantModel.init(
		{
			id: pk,
			title: { type: DataTypes.STRING(200), allowNull: false },
			status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
			approved_revision_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			withdrawn_at: { type: DataTypes.DATE(3), allowNull: true },
			withdrawn_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			withdrawn_reason: { type: DataTypes.TEXT, allowNull: true },
			...ts
		},
		common(s, 'plant_models')
	);
	ModelRevision.init(
		{
			id: pk,
			revision_no: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
			state: { type: DataTypes.ENUM(...STATE_VALUES), allowNull: false, defaultValue: 'draft' },
			structure: { type: DataTypes.STRING(16), allowNull: false },
			parameters: jsonColumn('parameters', false),
			num: jsonColumn('num', false),
			den: jsonColumn('den', false),
			delay_s: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
			gain: { type: DataTypes.DOUBLE, allowNull: true },
			time_constant_s: { type: DataTypes.DOUBLE, allowNull: true },
			time_unit: { type: DataTypes.STRING(4), allowNull: false, defaultValue: 's' },
			mv_name: { type: DataTypes.STRING(120), allowNull: false },
			mv_unit: { type: DataTypes.STRING(32), allowNull: false },
			mv_min: { type: DataTypes.DOUBLE, allowNull: false },
			mv_max: { type: DataTypes.DOUBLE, allowNull: false },
			pv_name: { type: DataTypes.STRING(120), allowNull: false },
			pv_unit: { type: DataTypes.STRING(32), allowNull: false },
			pv_min: { type: DataTypes.DOUBLE, allowNull: false },
			pv_max: { type: DataTypes.DOUBLE, allowNull: false },
			op_mv: { type: DataTypes.DOUBLE, allowNull: true },
			op_pv: { type: DataTypes.DOUBLE, allowNull: true },
			op_note: { type: DataTypes.STRING(500), allowNull: true },
			method: { type: DataTypes.STRING(32), allowNull: false },
			test_date: { type: DataTypes.DATEONLY, allowNull: true },
			data_attachment_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			fit_r2: { type: DataTypes.DOUBLE, allowNull: true },
			fit_rmse: { type: DataTypes.DOUBLE, allowNull: true },
			valid_range: { type: DataTypes.STRING(500), allowNull: true },
			revalidate_by: { type: DataTypes.DATEONLY, allowNull: true },
			change_summary: { type: DataTypes.TEXT, allowNull: true },
			review_comment: { type: DataTypes.TEXT, allowNull: true },
			reviewer_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			submitted_at: { type: DataTypes.DATE(3), allowNull: true },
			reviewed_at: { type: DataTypes.DATE(3), allowNull: true },
			approved_at: { type: DataTypes.DATE(3), allowNull: true },
			base_revision_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			is_revalidation: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
			...ts
		},
		{ ...common(s, 'model_revisions'), version: true }
	);
	RevisionContributor.init(
		{
			revision_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
			user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
			created_at: DataTypes.DATE(3)
		},
		{ sequelize: s, tableName: 'revision_contributors', underscored: true, createdAt: 'created_at', updatedAt: false }
	);
	TuningSet.init(
		{
			id: pk,
			loop_tag: { type: DataTypes.STRING(40), allowNull: false },
			state: { type: DataTypes.ENUM(...STATE_VALUES), allowNull: false, defaultValue: 'draft' },
			controller_type: { type: DataTypes.STRING(4), allowNull: false },
			form: { type: DataTypes.STRING(10), allowNull: false },
			kp: { type: DataTypes.DOUBLE, allowNull: false },
			ti_s: { type: DataTypes.DOUBLE, allowNull: true },
			td_s: { type: DataTypes.DOUBLE, allowNull: true },
			filter_n: { type: DataTypes.DOUBLE, allowNull: true },
			weight_b: { type: DataTypes.DOUBLE, allowNull: true },
			weight_c: { type: DataTypes.DOUBLE, allowNull: true },
			rule: { type: DataTypes.STRING(40), allowNull: true },
			rule_parameter: { type: DataTypes.DOUBLE, allowNull: true },
			predicted: jsonColumn('predicted', true),
			notes: { type: DataTypes.TEXT, allowNull: true },
			review_comment: { type: DataTypes.TEXT, allowNull: true },
			reviewer_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			submitted_at: { type: DataTypes.DATE(3), allowNull: true },
			reviewed_at: { type: DataTypes.DATE(3), allowNull: true },
			approved_at: { type: DataTypes.DATE(3), allowNull: true },
			version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
			...ts
		},
		{ ...common(s, 'tuning_sets'), version: true }
	);
	Attachment.init(
		{
			id: pk,
			model_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			revision_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			kind: { type: DataTypes.STRING(16), allowNull: false },
			filename: { type: DataTypes.STRING(255), allowNull: false },
			media_type: { type: DataTypes.STRING(100), allowNull: false },
			size_bytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
			sha256: { type: DataTypes.CHAR(64), allowNull: false },
			storage_key: { type: DataTypes.STRING(255), allowNull: false },
			uploaded_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
			created_at: DataTypes.DATE(3)
		},
		{ ...common(s, 'attachments'), updatedAt: false }
	);
	Note.init(
		{
			id: pk,
			title: { type: DataTypes.STRING(200), allowNull: false },
			body_md: { type: DataTypes.TEXT('medium'), allowNull: false },
			version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
			...ts
		},
		{ ...common(s, 'notes'), version: true }
	);
	AuditEvent.init(
		{
			id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
			at: { type: DataTypes.DATE(3), allowNull: false },
			actor_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			actor_email: { type: DataTypes.STRING(254), allowNull: true },
			action: { type: DataTypes.STRING(64), allowNull: false },
			entity_type: { type: DataTypes.STRING(40), allowNull: false },
			entity_id: { type: DataTypes.STRING(40), allowNull: true },
			before: jsonColumn('before', true),
			after: jsonColumn('after', true),
			ip: { type: DataTypes.STRING(64), allowNull: true }
		},
		{ sequelize: s, tableName: 'audit_events', timestamps: false }
	);
	ApiToken.init(
		{
			id: pk,
			user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
			name: { type: DataTypes.STRING(80), allowNull: false },
			token_hash: { type: DataTypes.CHAR(64), allowNull: false },
			prefix: { type: DataTypes.STRING(16), allowNull: false },
			last_used_at: { type: DataTypes.DATE(3), allowNull: true },
			expires_at: { type: DataTypes.DATE(3), allowNull: true },
			revoked_at: { type: DataTypes.DATE(3), allowNull: true },
			created_at: DataTypes.DATE(3)
		},
		{ ...common(s, 'api_tokens'), updatedAt: false }
	);

	Area.belongsTo(Site, { foreignKey: 'site_id', as: 'site' });
	Site.hasMany(Area, { foreignKey: 'site_id', as: 'areas' });
	Asset.belongsTo(Site, { foreignKey: 'site_id', as: 'site' });
	Asset.belongsTo(Area, { foreignKey: 'area_id', as: 'area' });
	Area.hasMany(Asset, { foreignKey: 'area_id', as: 'assets' });
	PlantModel.belongsTo(Asset, { foreignKey: 'asset_id', as: 'asset' });
	Asset.hasMany(PlantModel, { foreignKey: 'asset_id', as: 'models' });
	PlantModel.belongsTo(User, { foreignKey: 'created_by', as: 'creator' });
	PlantModel.hasMany(ModelRevision, { foreignKey: 'model_id', as: 'revisions' });
	PlantModel.belongsTo(ModelRevision, {
		foreignKey: 'approved_revision_id',
		as: 'approvedRevision',
		constraints: false
	});
	ModelRevision.belongsTo(PlantModel, { foreignKey: 'model_id', as: 'model' });
	ModelRevision.belongsTo(User, { foreignKey: 'author_id', as: 'author' });
	ModelRevision.belongsTo(User, { foreignKey: 'reviewer_id', as: 'reviewer' });
	TuningSet.belongsTo(PlantModel, { foreignKey: 'model_id', as: 'model' });
	TuningSet.belongsTo(ModelRevision, { foreignKey: 'model_revision_id', as: 'revision' });
	TuningSet.belongsTo(User, { foreignKey: 'author_id', as: 'author' });
	PlantModel.hasMany(TuningSet, { foreignKey: 'model_id', as: 'tuningSets' });
	Note.belongsTo(PlantModel, { foreignKey: 'model_id', as: 'model' });
	Note.belongsTo(User, { foreignKey: 'author_id', as: 'author' });
	PlantModel.hasMany(Note, { foreignKey: 'model_id', as: 'notes' });
	PlantModel.hasMany(Attachment, { foreignKey: 'model_id', as: 'attachments' });
	ApiToken.belongsTo(User, { foreignKey: 'user_id', as: 'user' });
	initWorkflowModels(s);
	initialised = true;
}
