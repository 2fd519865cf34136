/**
 * The transactional outbox: notifications are rows written in the SAME transaction as the change
 * they announce, so a rolled-back change never mails and a committed one always does. The worker
 * (`worker.ts`) sends them later. Also the weekly revalidation digest, idempotent per user and
 * ISO week through the row's unique `dedupe_key`. Relative imports only.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { sequelize } from '../db/connection';
import { initModels } from '../db/models';
import { MailOutbox } from '../db/models-workflow';
import { env } from '../env';
import { recordAudit } from '../audit';
import {
	approvedMail,
	changesRequestedMail,
	revalidationDigestMail,
	type DigestItem,
	type MailContent,
	type MailKind,
	type ReviewMailFacts
} from './templates';

/** A message to queue. */
export interface OutboxMessage {
	kind: MailKind;
	to: { userId: number | null; address: string };
	content: MailContent;
	entity?: { type: string; id: number | string } | null;
	/** Unique key: a second message with the same key is not queued (returns null). */
	dedupeKey?: string | null;
}

/** The public origin of the app for links in mail (ORIGIN, default http://localhost:3000), without a trailing slash. */
export function appOrigin(): string {
	return (env().ORIGIN || 'http://localhost:3000').replace(/\/+$/, '');
}

/** Absolute link to a model page. */
export function modelLink(modelId: number): string {
	return `${appOrigin()}/models/${modelId}`;
}

/** The Message-ID domain: the host of MAIL_FROM's address, else `loopledger.local`. */
function messageIdDomain(): string {
	const m = /@([A-Za-z0-9.-]+)>?\s*$/.exec(env().MAIL_FROM);
	return m ? m[1] : 'loopledger.local';
}

/**
 * Queue one message inside `transaction` (required). Returns the outbox row id, or null when a
 * row with the same `dedupeKey` already exists. Due at once.
 */
export async function enqueueMail(transaction: Transaction, message: OutboxMessage, now: Date = new Date()): Promise<number | null> {
	if (!transaction) throw new Error('enqueueMail needs the transaction of the change it announces');
	initModels();
	try {
		const row = await MailOutbox.create(
			{
				kind: message.kind,
				dedupe_key: message.dedupeKey ?? null,
				to_user_id: message.to.userId,
				to_address: message.to.address,
				subject: message.content.subject.slice(0, 300),
				text_body: message.content.text,
				html_body: message.content.html,
				entity_type: message.entity ? message.entity.type.slice(0, 40) : null,
				entity_id: message.entity ? String(message.entity.id).slice(0, 40) : null,
				message_id: `<${randomUUID()}@${messageIdDomain()}>`,
				last_error: null,
				next_attempt_at: now,
				claimed_by: null,
				claimed_until: null,
				sent_at: null
			},
			{ transaction }
		);
		return Number(row.id);
	} catch (e) {
		if (e instanceof UniqueConstraintError && message.dedupeKey) return null;
		throw e;
	}
}

/** A person who can receive mail. */
export interface Recipient {
	id: number;
	email: string;
	name: string;
}

/** Active reviewers (role `reviewer`) except `excludeIds`, ordered by id, read inside `transaction`. */
export async function activeReviewers(transaction: Transaction, excludeIds: readonly number[]): Promise<Recipient[]> {
	const rows = await sequelize().query<{ id: number; email: string; name: string }>(
		`SELECT id, email, name FROM users WHERE active = 1 AND role = 'reviewer' ORDER BY id`,
		{ type: QueryTypes.SELECT, transaction }
	);
	const skip = new Set(excludeIds.map(Number));
	return rows.filter((r) => !skip.has(Number(r.id))).map((r) => ({ id: Number(r.id), email: r.email, name: r.name }));
}

/** One person by id (active or not), read inside `transaction`; null when missing. */
export async function recipientById(transaction: Transaction, id: number): Promise<(Recipient & { active: boolean }) | null> {
	const rows = await sequelize().query<{ id: number; email: string; name: string; active: number }>(
		'SELECT id, email, name, active FROM users WHERE id = :id',
		{ type: QueryTypes.SELECT, transaction, replacements: { id } }
	);
	const r = rows[0];
	return r ? { id: Number(r.id), email: r.email, name: r.name, active: Boolean(Number(r.active)) } : null;
}

/** What a reviewer decided, as the author is told. */
export interface AuthorDecisionNotice {
	decision: 'approved' | 'changes_requested';
	/** Outbox kind (model revisions and tuning sets have their own). */
	kind: MailKind;
	authorId: number;
	entity: { type: string; id: number };
	reviewerName: string;
	comment: string | null;
	/** The facts of the revision or tuning set; read only when a message is queued. */
	facts: () => Promise<Omit<ReviewMailFacts, 'recipientName' | 'authorName' | 'reviewerName' | 'comment'>>;
}

/**
 * Queue, inside the decision's `transaction`, the mail that tells the author a reviewer approved
 * their revision or tuning set or sent it back; nothing for a missing or deactivated author.
 * Model revisions and tuning sets share this one path.
 */
export async function notifyAuthorOfDecision(transaction: Transaction, notice: AuthorDecisionNotice): Promise<void> {
	const author = await recipientById(transaction, notice.authorId);
	if (!author?.active) return;
	const facts: ReviewMailFacts = {
		...(await notice.facts()),
		recipientName: author.name,
		authorName: author.name,
		reviewerName: notice.reviewerName,
		comment: notice.comment
	};
	await enqueueMail(transaction, {
		kind: notice.kind,
		to: { userId: author.id, address: author.email },
		entity: notice.entity,
		content: notice.decision === 'approved' ? approvedMail(facts) : changesRequestedMail(facts)
	});
}

// ── Weekly digest ────────────────────────────────────────────────────────────────────────────

/** Models due within this many days (or overdue) go into the digest. */
export const DIGEST_HORIZON_DAYS = 14;

/**
 * ISO 8601 week of a UTC date, as `YYYY-Www` (weeks start on Monday; week 1 holds the year's
 * first Thursday). ISO 8601-1:2019, §5.2.2 (week date), from memory; checked against Python's
 * `date.isocalendar()`.
 */
export function isoWeek(d: Date): string {
	const t = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()));
	const day = t.getUTCDay() || 7;
	t.setUTCDate(t.getUTCDate() + 4 - day);
	const yearStart = Date.UTC(t.getUTCFullYear(), 0, 1);
	const week = Math.ceil(((t.getTime() - yearStart) / 86_400_000 + 1) / 7);
	return `${t.getUTCFullYear()}-W${String(week).padStart(2, '0')}`;
}

/** What one digest run queued. */
export interface DigestResult {
	isoWeek: string;
	/** People who got a digest row this run. */
	queued: number;
	/** People who already had this week's digest. */
	alreadyQueued: number;
	/** People skipped because they opted out or are deactivated. */
	optedOut: number;
	/** Models past or near revalidate-by, in total. */
	models: number;
}

/**
 * Queue the weekly digest of models past or within `DIGEST_HORIZON_DAYS` of their revalidate-by
 * date: one message per responsible engineer (the author of the model's approved revision),
 * skipping people who opted out (`users.digest_opt_out`) or are deactivated. Idempotent per
 * person and ISO week: running it again in the same week queues nothing new. One transaction.
 */
export async function queueRevalidationDigest(now: Date = new Date()): Promise<DigestResult> {
	initModels();
	const today = now.toISOString().slice(0, 10);
	const horizon = new Date(now.getTime() + DIGEST_HORIZON_DAYS * 86_400_000).toISOString().slice(0, 10);
	const week = isoWeek(now);
	return sequelize().transaction(async (transaction) => {
		const rows = await sequelize().query<{
			model_id: number;
			title: string;
			tag: string;
			revalidate_by: string;
			user_id: number;
			email: string;
			name: string;
			active: number;
			digest_opt_out: number;
		}>(
			`SELECT pm.id AS model_id, pm.title, a.tag, DATE_FORMAT(r.revalidate_by, '%Y-%m-%d') AS revalidate_by,
				u.id AS user_id, u.email, u.name, u.active, u.digest_opt_out
			FROM plant_models pm
			JOIN model_revisions r ON r.id = pm.approved_revision_id
			JOIN assets a ON a.id = pm.asset_id
			JOIN users u ON u.id = r.author_id
			WHERE pm.status = 'active' AND r.revalidate_by IS NOT NULL AND r.revalidate_by <= :horizon
			ORDER BY u.id, r.revalidate_by, pm.id`,
			{ type: QueryTypes.SELECT, transaction, replacements: { horizon } }
		);
		const byUser = new Map<number, { email: string; name: string; eligible: boolean; items: DigestItem[] }>();
		for (const r of rows) {
			const id = Number(r.user_id);
			let entry = byUser.get(id);
			if (!entry) {
				entry = { email: r.email, name: r.name, eligible: Boolean(Number(r.active)) && !Number(r.digest_opt_out), items: [] };
				byUser.set(id, entry);
			}
			entry.items.push({
				modelTitle: r.title,
				assetTag: r.tag,
				revalidateBy: r.revalidate_by,
				daysLeft: Math.round((Date.parse(`${r.revalidate_by}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / 86_400_000),
				link: modelLink(Number(r.model_id))
			});
		}
		const result: DigestResult = { isoWeek: week, queued: 0, alreadyQueued: 0, optedOut: 0, models: rows.length };
		for (const [userId, entry] of byUser) {
			if (!entry.eligible) {
				result.optedOut++;
				continue;
			}
			const content = revalidationDigestMail({ recipientName: entry.name, isoWeek: week, items: entry.items, profileLink: `${appOrigin()}/profile` });
			const id = await enqueueMail(
				transaction,
				{
					kind: 'revalidation_digest',
					to: { userId, address: entry.email },
					content,
					entity: { type: 'user', id: userId },
					dedupeKey: `digest:${userId}:${week}`
				},
				now
			);
			if (id === null) result.alreadyQueued++;
			else result.queued++;
		}
		if (result.queued > 0) {
			await recordAudit(transaction, {
				actor: null,
				action: 'mail.digest_queued',
				entityType: 'mail_outbox',
				entityId: null,
				after: { ...result }
			});
		}
		return result;
	});
}
