/**
 * Initial schema: people, the ISA-95 hierarchy (site → area → asset), plant models and their
 * revisions, tuning sets, attachments, notes, the append-only audit log, API tokens and the
 * sign-in throttle. Times are UTC DATETIME(3).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

const ROLES = ['viewer', 'engineer', 'reviewer', 'admin'];
export const ASSET_KINDS = [
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
];
const STRUCTURES = ['fopdt', 'sopdt', 'ipdt', 'second_order', 'rational'];
const REVISION_STATES = ['draft', 'in_review', 'changes_requested', 'approved', 'superseded', 'withdrawn'];
const METHODS = ['step_test', 'two_point', 'least_squares', 'datasheet', 'first_principles'];

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const fk = (table: string, allowNull = false, onDelete = 'RESTRICT') => ({
	type: DataTypes.INTEGER.UNSIGNED,
	allowNull,
	references: { model: table, key: 'id' },
	onUpdate: 'CASCADE',
	onDelete
});
const stamps = {
	created_at: { type: DataTypes.DATE(3), allowNull: false },
	updated_at: { type: DataTypes.DATE(3), allowNull: false }
};

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
	await qi.createTable('users', {
		id,
		email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
		name: { type: DataTypes.STRING(120), allowNull: false },
		role: { type: DataTypes.ENUM(...ROLES), allowNull: false, defaultValue: 'viewer' },
		password_hash: { type: DataTypes.STRING(100), allowNull: false },
		must_change_password: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
		active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
		digest_opt_out: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
		last_sign_in_at: { type: DataTypes.DATE(3), allowNull: true },
		...stamps
	});
	await qi.addIndex('users', ['role']);

	await qi.createTable('sign_in_throttle', {
		key_hash: { type: DataTypes.CHAR(64), primaryKey: true },
		failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
		last_failure_at: { type: DataTypes.DATE(3), allowNull: true },
		locked_until: { type: DataTypes.DATE(3), allowNull: true }
	});

	await qi.createTable('sites', {
		id,
		code: { type: DataTypes.STRING(32), allowNull: false, unique: true },
		name: { type: DataTypes.STRING(120), allowNull: false },
		description: { type: DataTypes.TEXT, allowNull: true },
		...stamps
	});

	await qi.createTable('areas', {
		id,
		site_id: fk('sites'),
		code: { type: DataTypes.STRING(32), allowNull: false },
		name: { type: DataTypes.STRING(120), allowNull: false },
		description: { type: DataTypes.TEXT, allowNull: true },
		...stamps
	});
	await qi.addIndex('areas', ['site_id', 'code'], { unique: true, name: 'areas_site_code_unique' });

	await qi.createTable('assets', {
		id,
		site_id: fk('sites'),
		area_id: fk('areas'),
		tag: { type: DataTypes.STRING(40), allowNull: false },
		kind: { type: DataTypes.ENUM(...ASSET_KINDS), allowNull: false },
		name: { type: DataTypes.STRING(160), allowNull: false },
		description: { type: DataTypes.TEXT, allowNull: true },
		...stamps
	});
	await qi.addIndex('assets', ['site_id', 'tag'], { unique: true, name: 'assets_site_tag_unique' });
	await qi.addIndex('assets', ['area_id']);
	await qi.addIndex('assets', ['kind']);

	await qi.createTable('plant_models', {
		id,
		asset_id: fk('assets'),
		title: { type: DataTypes.STRING(200), allowNull: false },
		status: {
			type: DataTypes.ENUM('draft', 'active', 'withdrawn'),
			allowNull: false,
			defaultValue: 'draft'
		},
		approved_revision_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
		withdrawn_at: { type: DataTypes.DATE(3), allowNull: true },
		withdrawn_by: fk('users', true),
		withdrawn_reason: { type: DataTypes.TEXT, allowNull: true },
		created_by: fk('users'),
		...stamps
	});
	await qi.addIndex('plant_models', ['asset_id']);
	await qi.addIndex('plant_models', ['status']);

	await qi.createTable('model_revisions', {
		id,
		model_id: fk('plant_models', false, 'CASCADE'),
		revision_no: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
		state: { type: DataTypes.ENUM(...REVISION_STATES), allowNull: false, defaultValue: 'draft' },
		structure: { type: DataTypes.ENUM(...STRUCTURES), allowNull: false },
		/** Structure-specific parameters as entered: k, tau, tau2, zeta, wn, theta (seconds). */
		parameters: { type: DataTypes.JSON, allowNull: false },
		num: { type: DataTypes.JSON, allowNull: false },
		den: { type: DataTypes.JSON, allowNull: false },
		delay_s: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
		/** Listing columns derived from parameters, for filtering and sorting. */
		gain: { type: DataTypes.DOUBLE, allowNull: true },
		time_constant_s: { type: DataTypes.DOUBLE, allowNull: true },
		time_unit: { type: DataTypes.ENUM('s', 'min'), allowNull: false, defaultValue: 's' },
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
		method: { type: DataTypes.ENUM(...METHODS), allowNull: false },
		test_date: { type: DataTypes.DATEONLY, allowNull: true },
		data_attachment_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
		fit_r2: { type: DataTypes.DOUBLE, allowNull: true },
		fit_rmse: { type: DataTypes.DOUBLE, allowNull: true },
		valid_range: { type: DataTypes.STRING(500), allowNull: true },
		revalidate_by: { type: DataTypes.DATEONLY, allowNull: true },
		change_summary: { type: DataTypes.TEXT, allowNull: true },
		review_comment: { type: DataTypes.TEXT, allowNull: true },
		author_id: fk('users'),
		reviewer_id: fk('users', true),
		submitted_at: { type: DataTypes.DATE(3), allowNull: true },
		reviewed_at: { type: DataTypes.DATE(3), allowNull: true },
		approved_at: { type: DataTypes.DATE(3), allowNull: true },
		version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
		...stamps
	});
	await qi.addIndex('model_revisions', ['model_id', 'revision_no'], {
		unique: true,
		name: 'model_revisions_model_no_unique'
	});
	await qi.addIndex('model_revisions', ['model_id', 'state']);
	await qi.addIndex('model_revisions', ['state', 'submitted_at']);
	await qi.addIndex('model_revisions', ['structure']);
	await qi.addIndex('model_revisions', ['revalidate_by']);
	await qi.addIndex('model_revisions', ['author_id']);
	await qi.addConstraint('plant_models', {
		type: 'foreign key',
		fields: ['approved_revision_id'],
		name: 'plant_models_approved_revision_fk',
		references: { table: 'model_revisions', field: 'id' },
		onDelete: 'SET NULL',
		onUpdate: 'CASCADE'
	});

	await qi.createTable('revision_contributors', {
		revision_id: {
			type: DataTypes.INTEGER.UNSIGNED,
			primaryKey: true,
			references: { model: 'model_revisions', key: 'id' },
			onDelete: 'CASCADE'
		},
		user_id: {
			type: DataTypes.INTEGER.UNSIGNED,
			primaryKey: true,
			references: { model: 'users', key: 'id' },
			onDelete: 'RESTRICT'
		},
		created_at: { type: DataTypes.DATE(3), allowNull: false }
	});

	await qi.createTable('tuning_sets', {
		id,
		model_id: fk('plant_models', false, 'CASCADE'),
		model_revision_id: fk('model_revisions'),
		loop_tag: { type: DataTypes.STRING(40), allowNull: false },
		state: { type: DataTypes.ENUM(...REVISION_STATES), allowNull: false, defaultValue: 'draft' },
		controller_type: { type: DataTypes.ENUM('P', 'PI', 'PD', 'PID'), allowNull: false },
		form: { type: DataTypes.ENUM('ideal', 'series', 'parallel'), allowNull: false },
		kp: { type: DataTypes.DOUBLE, allowNull: false },
		ti_s: { type: DataTypes.DOUBLE, allowNull: true },
		td_s: { type: DataTypes.DOUBLE, allowNull: true },
		filter_n: { type: DataTypes.DOUBLE, allowNull: true },
		weight_b: { type: DataTypes.DOUBLE, allowNull: true },
		weight_c: { type: DataTypes.DOUBLE, allowNull: true },
		rule: { type: DataTypes.STRING(40), allowNull: true },
		rule_parameter: { type: DataTypes.DOUBLE, allowNull: true },
		predicted: { type: DataTypes.JSON, allowNull: true },
		notes: { type: DataTypes.TEXT, allowNull: true },
		review_comment: { type: DataTypes.TEXT, allowNull: true },
		author_id: fk('users'),
		reviewer_id: fk('users', true),
		submitted_at: { type: DataTypes.DATE(3), allowNull: true },
		reviewed_at: { type: DataTypes.DATE(3), allowNull: true },
		approved_at: { type: DataTypes.DATE(3), allowNull: true },
		version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
		...stamps
	});
	await qi.addIndex('tuning_sets', ['model_id', 'state']);
	await qi.addIndex('tuning_sets', ['loop_tag']);

	await qi.createTable('attachments', {
		id,
		model_id: fk('plant_models', true, 'CASCADE'),
		revision_id: fk('model_revisions', true, 'SET NULL'),
		kind: {
			type: DataTypes.ENUM('datasheet', 'step_test', 'image', 'other'),
			allowNull: false
		},
		filename: { type: DataTypes.STRING(255), allowNull: false },
		media_type: { type: DataTypes.STRING(100), allowNull: false },
		size_bytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
		sha256: { type: DataTypes.CHAR(64), allowNull: false },
		storage_key: { type: DataTypes.STRING(255), allowNull: false, unique: true },
		uploaded_by: fk('users'),
		created_at: { type: DataTypes.DATE(3), allowNull: false }
	});
	await qi.addIndex('attachments', ['model_id']);
	await qi.addIndex('attachments', ['sha256']);
	await qi.addConstraint('model_revisions', {
		type: 'foreign key',
		fields: ['data_attachment_id'],
		name: 'model_revisions_data_attachment_fk',
		references: { table: 'attachments', field: 'id' },
		onDelete: 'SET NULL',
		onUpdate: 'CASCADE'
	});

	await qi.createTable('notes', {
		id,
		model_id: fk('plant_models', false, 'CASCADE'),
		title: { type: DataTypes.STRING(200), allowNull: false },
		body_md: { type: DataTypes.TEXT('medium'), allowNull: false },
		author_id: fk('users'),
		version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
		...stamps
	});
	await qi.addIndex('notes', ['model_id']);

	await qi.createTable('audit_events', {
		id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
		at: { type: DataTypes.DATE(3), allowNull: false },
		actor_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
		actor_email: { type: DataTypes.STRING(254), allowNull: true },
		action: { type: DataTypes.STRING(64), allowNull: false },
		entity_type: { type: DataTypes.STRING(40), allowNull: false },
		entity_id: { type: DataTypes.STRING(40), allowNull: true },
		before: { type: DataTypes.JSON, allowNull: true },
		after: { type: DataTypes.JSON, allowNull: true },
		ip: { type: DataTypes.STRING(64), allowNull: true }
	});
	await qi.addIndex('audit_events', ['entity_type', 'entity_id']);
	await qi.addIndex('audit_events', ['actor_id']);
	await qi.addIndex('audit_events', ['action']);
	await qi.addIndex('audit_events', ['at']);
	// The audit log is append-only: the database itself refuses updates and deletes.
	await qi.sequelize.query(
		`CREATE TRIGGER audit_events_no_update BEFORE UPDATE ON audit_events FOR EACH ROW
		 SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_events is append-only'`
	);
	await qi.sequelize.query(
		`CREATE TRIGGER audit_events_no_delete BEFORE DELETE ON audit_events FOR EACH ROW
		 SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_events is append-only'`
	);

	await qi.createTable('api_tokens', {
		id,
		user_id: fk('users', false, 'CASCADE'),
		name: { type: DataTypes.STRING(80), allowNull: false },
		token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
		prefix: { type: DataTypes.STRING(16), allowNull: false },
		last_used_at: { type: DataTypes.DATE(3), allowNull: true },
		expires_at: { type: DataTypes.DATE(3), allowNull: true },
		revoked_at: { type: DataTypes.DATE(3), allowNull: true },
		created_at: { type: DataTypes.DATE(3), allowNull: false }
	});
	await qi.addIndex('api_tokens', ['user_id']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
	await qi.dropTable('api_tokens');
	await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_events_no_update');
	await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_events_no_delete');
	await qi.dropTable('audit_events');
	await qi.dropTable('notes');
	await qi.removeConstraint('model_revisions', 'model_revisions_data_attachment_fk');
	await qi.dropTable('attachments');
	await qi.dropTable('tuning_sets');
	await qi.dropTable('revision_contributors');
	await qi.removeConstraint('plant_models', 'plant_models_approved_revision_fk');
	await qi.dropTable('model_revisions');
	await qi.dropTable('plant_models');
	await qi.dropTable('assets');
	await qi.dropTable('areas');
	await qi.dropTable('sites');
	await qi.dropTable('sign_in_throttle');
	await qi.dropTable('users');
}
