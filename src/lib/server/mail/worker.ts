/**
 * The mail worker: sends what the outbox holds, marks it sent, and on failure records the attempt
 * (attempts, last_error) and retries later with exponential back-off. Rows are CLAIMED before
 * sending — one `UPDATE … SET claimed_by = <batch token>, claimed_until = … WHERE unclaimed … LIMIT n`
 * and then a read of the rows carrying that token — so two app servers never pick the same row;
 * a crashed worker's claim simply expires. A mail server that is down never loses a message: the
 * row stays `pending` and is retried, at most once per hour, until it is accepted. A permanent
 * refusal (SMTP 5xx) ends `failed`, kept with its error for an administrator to re-queue.
 *
 * Delivery is at-least-once across an app crash between "accepted by SMTP" and "marked sent";
 * every row has a fixed Message-ID, so a receiver can drop such a copy. Relative imports only.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../db/connection';
import { initModels } from '../db/models';
import { MailOutbox, type OutboxStatus } from '../db/models-workflow';
import { env } from '../env';
import { recordAudit } from '../audit';
import { assertCan } from '../../auth/roles';
import { Conflict, NotFound } from '../errors';
import type { Acting } from '../workflow-common';
import { createMailTransport, type MailTransport } from './transport';
import { queueRevalidationDigest } from './outbox';

/** First retry delay, seconds. */
export const BACKOFF_BASE_SECONDS = 30;
/** Longest retry delay, seconds. */
export const BACKOFF_CAP_SECONDS = 3600;

/**
 * Delay before the next attempt after `failedAttempts` failures (≥ 1): 30 s · 2^(n−1), at most
 * one hour — 30 s, 60 s, 120 s, … (exponential back-off, common practice).
 */
export function backoffSeconds(failedAttempts: number): number {
	const n = Math.max(1, Math.floor(failedAttempts));
	return Math.min(BACKOFF_CAP_SECONDS, BACKOFF_BASE_SECONDS * 2 ** Math.min(n - 1, 30));
}

/** What one delivery run did. */
export interface DeliveryReport {
	claimed: number;
	sent: number;
	/** Failed this time, retry scheduled. */
	retrying: number;
	/** Refused permanently (SMTP 5xx): status `failed`. */
	failed: number;
}

/** Options of one delivery run. */
export interface DeliverOptions {
	/** Default: `createMailTransport()` (SMTP_URL or the local catcher). */
	transport?: MailTransport;
	now?: Date;
	/** Rows per run (default 20). */
	limit?: number;
	/** How long a claim holds, seconds (default 600). */
	claimSeconds?: number;
}

function smtpResponseCode(e: unknown): number | null {
	const code = (e as { responseCode?: unknown } | null)?.responseCode;
	return typeof code === 'number' ? code : null;
}

function errorText(e: unknown): string {
	const m = e instanceof Error ? e.message : String(e);
	const code = (e as { code?: unknown } | null)?.code;
	return `${typeof code === 'string' ? `${code}: ` : ''}${m}`.slice(0, 1000);
}

/**
 * Claim the due rows (at most `limit`), send each, and record the outcome. Safe to run from
 * several processes at once. Returns what happened.
 */
export async function deliverPending(options: DeliverOptions = {}): Promise<DeliveryReport> {
	initModels();
	const db = sequelize();
	const now = options.now ?? new Date();
	const limit = Math.max(1, Math.min(options.limit ?? 20, 500));
	const token = randomUUID();
	const until = new Date(now.getTime() + (options.claimSeconds ?? 600) * 1000);
	await db.query(
		`UPDATE mail_outbox SET claimed_by = :token, claimed_until = :until
		WHERE status = 'pending' AND next_attempt_at <= :now AND (claimed_until IS NULL OR claimed_until < :now)
		ORDER BY next_attempt_at, id LIMIT ${limit}`,
		{ replacements: { token, until, now } }
	);
	const rows = await MailOutbox.findAll({ where: { claimed_by: token, status: 'pending' }, order: [['id', 'ASC']] });
	const report: DeliveryReport = { claimed: rows.length, sent: 0, retrying: 0, failed: 0 };
	if (rows.length === 0) return report;
	const transport = options.transport ?? createMailTransport();
	const from = env().MAIL_FROM;
	try {
		for (const row of rows) {
			try {
				await transport.sendMail({
					from,
					to: row.to_address,
					subject: row.subject,
					text: row.text_body,
					html: row.html_body,
					messageId: row.message_id
				});
				await db.query(
					`UPDATE mail_outbox SET status = 'sent', sent_at = :at, attempts = attempts + 1, last_error = NULL,
						claimed_by = NULL, claimed_until = NULL, updated_at = :at
					WHERE id = :id AND claimed_by = :token`,
					{ replacements: { id: row.id, token, at: new Date() } }
				);
				report.sent++;
			} catch (e) {
				const code = smtpResponseCode(e);
				const permanent = code !== null && code >= 500 && code < 600;
				const attempts = Number(row.attempts) + 1;
				const next = new Date(now.getTime() + backoffSeconds(attempts) * 1000);
				await db.query(
					`UPDATE mail_outbox SET status = :status, attempts = :attempts, last_error = :error, next_attempt_at = :next,
						claimed_by = NULL, claimed_until = NULL, updated_at = :at
					WHERE id = :id AND claimed_by = :token`,
					{
						replacements: {
							id: row.id,
							token,
							status: permanent ? 'failed' : 'pending',
							attempts,
							error: errorText(e),
							next,
							at: new Date()
						}
					}
				);
				if (permanent) report.failed++;
				else report.retrying++;
			}
		}
	} finally {
		if (!options.transport) transport.close?.();
	}
	return report;
}

/** A running worker. */
export interface MailWorkerHandle {
	/** Stop the timer and wait for a run in progress. */
	stop(): Promise<void>;
}

/** One worker per process (module state on purpose: a background job belongs to the process). */
let running: { handle: MailWorkerHandle } | null = null;

/**
 * Start the in-process worker: every `intervalMs` (default 5 s) it delivers due mail, and every
 * `digestEveryMs` (default 1 h) it queues the weekly revalidation digest (idempotent per week, so
 * the first run of a week queues it). Runs never overlap. A second call returns the same worker.
 * With MAIL_WORKER=0 it does nothing (another server sends). Errors are logged, never thrown.
 */
export function startMailWorker(options: { intervalMs?: number; digestEveryMs?: number; transport?: MailTransport } = {}): MailWorkerHandle {
	if (running) return running.handle;
	if (env().MAIL_WORKER === '0') return { stop: async () => {} };
	const intervalMs = Math.max(250, options.intervalMs ?? 5_000);
	const digestEveryMs = Math.max(60_000, options.digestEveryMs ?? 3_600_000);
	let lastDigest = 0;
	let busy: Promise<void> | null = null;
	let stopped = false;
	const tick = () => {
		if (busy || stopped) return;
		busy = (async () => {
			try {
				if (Date.now() - lastDigest >= digestEveryMs) {
					lastDigest = Date.now();
					await queueRevalidationDigest(new Date());
				}
				// Keep sending while full batches come back, so a backlog drains quickly.
				for (let i = 0; i < 10; i++) {
					const r = await deliverPending({ transport: options.transport });
					if (r.claimed < 20 || stopped) break;
				}
			} catch (e) {
				console.error(`[mail] worker run failed: ${e instanceof Error ? e.message : String(e)}`);
			} finally {
				busy = null;
			}
		})();
	};
	const timer = setInterval(tick, intervalMs);
	timer.unref?.();
	const handle: MailWorkerHandle = {
		async stop() {
			stopped = true;
			clearInterval(timer);
			if (busy) await busy;
			running = null;
		}
	};
	running = { handle };
	return handle;
}

// ── Administration ───────────────────────────────────────────────────────────────────────────

/** An outbox row for the administrators' mail page (no bodies). */
export interface OutboxItemDto {
	id: number;
	kind: string;
	to: string;
	subject: string;
	status: OutboxStatus;
	attempts: number;
	lastError: string | null;
	nextAttemptAt: string;
	sentAt: string | null;
	createdAt: string;
}

/** The newest outbox rows, optionally of one status. Administrators only. */
export async function listOutbox(acting: Acting, filter: { status?: OutboxStatus; limit?: number } = {}): Promise<OutboxItemDto[]> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const rows = await MailOutbox.findAll({
		where: filter.status ? { status: filter.status } : {},
		order: [['id', 'DESC']],
		limit: Math.max(1, Math.min(filter.limit ?? 100, 500))
	});
	return rows.map((r) => ({
		id: Number(r.id),
		kind: r.kind,
		to: r.to_address,
		subject: r.subject,
		status: r.status,
		attempts: Number(r.attempts),
		lastError: r.last_error,
		nextAttemptAt: new Date(r.next_attempt_at).toISOString(),
		sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
		createdAt: new Date(r.created_at).toISOString()
	}));
}

/** Put a `failed` message back in the queue, due now. Administrators only; audited. */
export async function retryFailedMail(acting: Acting, id: number): Promise<void> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	await sequelize().transaction(async (transaction) => {
		const row = await MailOutbox.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
		if (!row) throw new NotFound('There is no such message in the outbox.');
		if (row.status !== 'failed') throw new Conflict('Only a message that failed can be queued again.');
		await sequelize().query(
			`UPDATE mail_outbox SET status = 'pending', next_attempt_at = :now, claimed_by = NULL, claimed_until = NULL, updated_at = :now WHERE id = :id`,
			{ transaction, replacements: { id, now: new Date() }, type: QueryTypes.UPDATE }
		);
		await recordAudit(transaction, {
			actor: acting.user,
			action: 'mail.retry',
			entityType: 'mail_outbox',
			entityId: id,
			before: { status: row.status, attempts: row.attempts, lastError: row.last_error },
			after: { status: 'pending' },
			ip: acting.ip
		});
	});
}
