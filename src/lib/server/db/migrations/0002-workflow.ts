/**
 * The review workflow: the transactional mail outbox, the local mail catcher's store, who edited
 * each tuning set (four-eyes), and two columns of model revisions — the approved revision a draft
 * started from, and whether a revision is a revalidation (an unchanged model re-approved with a
 * new revalidate-by date). Times are UTC DATETIME(3).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

/** Adds the workflow tables and columns. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
	await qi.addColumn('model_revisions', 'base_revision_id', {
		type: DataTypes.INTEGER.UNSIGNED,
		allowNull: true,
		references: { model: 'model_revisions', key: 'id' },
		onUpdate: 'CASCADE',
		onDelete: 'SET NULL'
	});
	await qi.addColumn('model_revisions', 'is_revalidation', {
		type: DataTypes.BOOLEAN,
		allowNull: false,
		defaultValue: false
	});

	await qi.createTable('tuning_set_contributors', {
		tuning_set_id: {
			type: DataTypes.INTEGER.UNSIGNED,
			primaryKey: true,
			references: { model: 'tuning_sets', key: 'id' },
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

	await qi.createTable('mail_outbox', {
		id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
		/** review_requested, approved, changes_requested, revalidation_digest, … */
		kind: { type: DataTypes.STRING(40), allowNull: false },
		/** Idempotency key (e.g. one digest per user per ISO week); NULL for one-off notifications. */
		dedupe_key: { type: DataTypes.STRING(191), allowNull: true, unique: true },
		to_user_id: {
			type: DataTypes.INTEGER.UNSIGNED,
			allowNull: true,
			references: { model: 'users', key: 'id' },
			onUpdate: 'CASCADE',
			onDelete: 'SET NULL'
		},
		to_address: { type: DataTypes.STRING(254), allowNull: false },
		subject: { type: DataTypes.STRING(300), allowNull: false },
		text_body: { type: DataTypes.TEXT('medium'), allowNull: false },
		html_body: { type: DataTypes.TEXT('medium'), allowNull: false },
		entity_type: { type: DataTypes.STRING(40), allowNull: true },
		entity_id: { type: DataTypes.STRING(40), allowNull: true },
		/** Message-ID header, fixed when the row is written, so a receiver can drop a re-sent copy. */
		message_id: { type: DataTypes.STRING(200), allowNull: false },
		status: { type: DataTypes.ENUM('pending', 'sent', 'failed'), allowNull: false, defaultValue: 'pending' },
		attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
		last_error: { type: DataTypes.STRING(1000), allowNull: true },
		next_attempt_at: { type: DataTypes.DATE(3), allowNull: false },
		/** Worker batch that holds the row, and until when (a crashed worker's claim expires). */
		claimed_by: { type: DataTypes.STRING(64), allowNull: true },
		claimed_until: { type: DataTypes.DATE(3), allowNull: true },
		sent_at: { type: DataTypes.DATE(3), allowNull: true },
		created_at: { type: DataTypes.DATE(3), allowNull: false },
		updated_at: { type: DataTypes.DATE(3), allowNull: false }
	});
	await qi.addIndex('mail_outbox', ['status', 'next_attempt_at'], { name: 'mail_outbox_due' });
	await qi.addIndex('mail_outbox', ['claimed_by'], { name: 'mail_outbox_claimed_by' });
	await qi.addIndex('mail_outbox', ['entity_type', 'entity_id'], { name: 'mail_outbox_entity' });

	await qi.createTable('caught_mail', {
		id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
		message_id: { type: DataTypes.STRING(300), allowNull: true },
		envelope_from: { type: DataTypes.STRING(254), allowNull: true },
		/** JSON array of the SMTP envelope recipients (RCPT TO). */
		envelope_to: { type: DataTypes.JSON, allowNull: false },
		from_header: { type: DataTypes.STRING(500), allowNull: true },
		to_header: { type: DataTypes.TEXT, allowNull: true },
		subject: { type: DataTypes.STRING(500), allowNull: true },
		text_body: { type: DataTypes.TEXT('medium'), allowNull: true },
		html_body: { type: DataTypes.TEXT('medium'), allowNull: true },
		raw_size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
		received_at: { type: DataTypes.DATE(3), allowNull: false }
	});
	await qi.addIndex('caught_mail', ['received_at'], { name: 'caught_mail_received' });
}

/** Removes them again (data in them is lost). */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
	await qi.dropTable('caught_mail');
	await qi.dropTable('mail_outbox');
	await qi.dropTable('tuning_set_contributors');
	await qi.removeColumn('model_revisions', 'is_revalidation');
	// The foreign key must go before its column (MariaDB refuses to drop an indexed FK column).
	const fks = (await qi.getForeignKeyReferencesForTable('model_revisions')) as Array<{ constraintName: string; columnName: string }>;
	for (const fk of fks.filter((f) => f.columnName === 'base_revision_id')) {
		await qi.removeConstraint('model_revisions', fk.constraintName);
	}
	await qi.removeColumn('model_revisions', 'base_revision_id');
}
