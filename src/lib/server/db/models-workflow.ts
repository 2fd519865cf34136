/**
 * Sequelize models of the workflow tables of migration 0002: the mail outbox, the mail catcher's
 * store and the tuning-set contributors. Initialised by `initModels()` in `models.ts`; only the
 * services under `src/lib/server/` use them.
 */
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** pending (to send or retry), sent, failed (refused permanently). */
export type OutboxStatus = 'pending' | 'sent' | 'failed';

/** One queued notification (table mail_outbox). */
export class MailOutbox extends Model<InferAttributes<MailOutbox>, InferCreationAttributes<MailOutbox>> {
	declare id: CreationOptional<number>;
	declare kind: string;
	declare dedupe_key: string | null;
	declare to_user_id: number | null;
	declare to_address: string;
	declare subject: string;
	declare text_body: string;
	declare html_body: string;
	declare entity_type: string | null;
	declare entity_id: string | null;
	declare message_id: string;
	declare status: CreationOptional<OutboxStatus>;
	declare attempts: CreationOptional<number>;
	declare last_error: string | null;
	declare next_attempt_at: Date;
	declare claimed_by: string | null;
	declare claimed_until: Date | null;
	declare sent_at: Date | null;
	declare created_at: CreationOptional<Date>;
	declare updated_at: CreationOptional<Date>;
}

/** One message the local catcher received (table caught_mail). */
export class CaughtMail extends Model<InferAttributes<CaughtMail>, InferCreationAttributes<CaughtMail>> {
	declare id: CreationOptional<number>;
	declare message_id: string | null;
	declare envelope_from: string | null;
	declare envelope_to: string[];
	declare from_header: string | null;
	declare to_header: string | null;
	declare subject: string | null;
	declare text_body: string | null;
	declare html_body: string | null;
	declare raw_size: number;
	declare received_at: Date;
}

/** Someone who saved a tuning set (four-eyes; table tuning_set_contributors). */
export class TuningSetContributor extends Model<
	InferAttributes<TuningSetContributor>,
	InferCreationAttributes<TuningSetContributor>
> {
	declare tuning_set_id: number;
	declare user_id: number;
	declare created_at: CreationOptional<Date>;
}

/** Define the workflow models on `s` (called once from `initModels`). */
export function initWorkflowModels(s: Sequelize): void {
	MailOutbox.init(
		{
			id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
			kind: { type: DataTypes.STRING(40), allowNull: false },
			dedupe_key: { type: DataTypes.STRING(191), allowNull: true },
			to_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
			to_address: { type: DataTypes.STRING(254), allowNull: false },
			subject: { type: DataTypes.STRING(300), allowNull: false },
			text_body: { type: DataTypes.TEXT('medium'), allowNull: false },
			html_body: { type: DataTypes.TEXT('medium'), allowNull: false },
			entity_type: { type: DataTypes.STRING(40), allowNull: true },
			entity_id: { type: DataTypes.STRING(40), allowNull: true },
			message_id: { type: DataTypes.STRING(200), allowNull: false },
			status: { type: DataTypes.ENUM('pending', 'sent', 'failed'), allowNull: false, defaultValue: 'pending' },
			attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
			last_error: { type: DataTypes.STRING(1000), allowNull: true },
			next_attempt_at: { type: DataTypes.DATE(3), allowNull: false },
			claimed_by: { type: DataTypes.STRING(64), allowNull: true },
			claimed_until: { type: DataTypes.DATE(3), allowNull: true },
			sent_at: { type: DataTypes.DATE(3), allowNull: true },
			created_at: DataTypes.DATE(3),
			updated_at: DataTypes.DATE(3)
		},
		{ sequelize: s, tableName: 'mail_outbox', underscored: true, createdAt: 'created_at', updatedAt: 'updated_at' }
	);
	CaughtMail.init(
		{
			id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
			message_id: { type: DataTypes.STRING(300), allowNull: true },
			envelope_from: { type: DataTypes.STRING(254), allowNull: true },
			envelope_to: {
				type: DataTypes.JSON,
				allowNull: false,
				get(this: CaughtMail) {
					const raw = this.getDataValue('envelope_to') as unknown;
					if (typeof raw !== 'string') return (raw as string[]) ?? [];
					try {
						return JSON.parse(raw) as string[];
					} catch {
						return [];
					}
				}
			},
			from_header: { type: DataTypes.STRING(500), allowNull: true },
			to_header: { type: DataTypes.TEXT, allowNull: true },
			subject: { type: DataTypes.STRING(500), allowNull: true },
			text_body: { type: DataTypes.TEXT('medium'), allowNull: true },
			html_body: { type: DataTypes.TEXT('medium'), allowNull: true },
			raw_size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
			received_at: { type: DataTypes.DATE(3), allowNull: false }
		},
		{ sequelize: s, tableName: 'caught_mail', timestamps: false }
	);
	TuningSetContributor.init(
		{
			tuning_set_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
			user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
			created_at: DataTypes.DATE(3)
		},
		{ sequelize: s, tableName: 'tuning_set_contributors', underscored: true, createdAt: 'created_at', updatedAt: false }
	);
}
