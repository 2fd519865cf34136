/**
 * The append-only audit log. Every write in the product calls `recordAudit` inside the same
 * transaction as the change, so either both are stored or neither. There is deliberately no
 * update or delete here, and the database triggers of migration 0001 refuse both.
 */
import { Op, type Transaction } from 'sequelize';
import { AuditEvent, initModels } from './db/models';

/** Who did it: the signed-in person, or null for the system (seed, scripts). */
export interface AuditActor {
	id: number;
	email: string;
}

/** One audit event as recorded. `before`/`after` are plain JSON snapshots of whitelisted fields. */
export interface AuditInput {
	actor: AuditActor | null;
	/** Dotted verb, e.g. `user.create`, `auth.signin_failed` (at most 64 characters). */
	action: string;
	/** Table-like noun, e.g. `user`, `model_revision` (at most 40 characters). */
	entityType: string;
	entityId?: string | number | null;
	before?: unknown;
	after?: unknown;
	/** Client address as seen by the server (never taken from X-Forwarded-For unless configured). */
	ip?: string | null;
}

/** An audit event as returned to readers. */
export interface AuditEventDto {
	id: number;
	at: string;
	actorId: number | null;
	actorEmail: string | null;
	action: string;
	entityType: string;
	entityId: string | null;
	before: unknown;
	after: unknown;
	ip: string | null;
}

/** Keys never written to the log, at any depth: secrets and their hashes. */
const SECRET_KEYS = /^(password|password_hash|passwordHash|token|token_hash|tokenHash|secret|oneTimePassword)$/i;

/** A JSON-safe copy of `value` without secret keys; NaN/Infinity become null. */
export function redactForAudit(value: unknown, depth = 0): unknown {
	if (value === undefined) return null;
	if (value === null || typeof value === 'string' || typeof value === 'boolean') return value;
	if (typeof value === 'number') return Number.isFinite(value) ? value : null;
	if (value instanceof Date) return value.toISOString();
	if (depth > 8) return null;
	if (Array.isArray(value)) return value.map((v) => redactForAudit(v, depth + 1));
	if (typeof value === 'object') {
		const out: Record<string, unknown> = {};
		for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
			if (SECRET_KEYS.test(k)) continue;
			out[k] = redactForAudit(v, depth + 1);
		}
		return out;
	}
	return String(value);
}

/**
 * Append one audit event inside `transaction` (required: an audit row must never outlive a
 * rolled-back change, nor a change exist without its row). Returns the new event id.
 */
export async function recordAudit(transaction: Transaction, event: AuditInput): Promise<number> {
	if (!transaction) throw new Error('recordAudit needs the transaction of the change it records');
	if (!/^[a-z][a-z0-9_.]{1,63}$/.test(event.action)) throw new Error(`Bad audit action name: ${event.action}`);
	initModels();
	const row = await AuditEvent.create(
		{
			at: new Date(),
			actor_id: event.actor?.id ?? null,
			actor_email: event.actor?.email ?? null,
			action: event.action,
			entity_type: event.entityType.slice(0, 40),
			entity_id: event.entityId === undefined || event.entityId === null ? null : String(event.entityId).slice(0, 40),
			before: event.before === undefined ? null : redactForAudit(event.before),
			after: event.after === undefined ? null : redactForAudit(event.after),
			ip: event.ip ? event.ip.slice(0, 64) : null
		},
		{ transaction }
	);
	return Number(row.id);
}

/** The audit trail of one entity, newest first (at most `limit` rows). */
export async function auditTrail(entityType: string, entityId: string | number, limit = 100): Promise<AuditEventDto[]> {
	initModels();
	const rows = await AuditEvent.findAll({
		where: { entity_type: entityType, entity_id: String(entityId) },
		order: [['id', 'DESC']],
		limit: Math.max(1, Math.min(limit, 1000))
	});
	return rows.map(toDto);
}

/** The most recent audit events, newest first, optionally only those whose action starts with `actionPrefix`. */
export async function recentAudit(limit = 50, actionPrefix?: string): Promise<AuditEventDto[]> {
	initModels();
	const rows = await AuditEvent.findAll({
		where: actionPrefix ? { action: { [Op.startsWith]: actionPrefix } } : {},
		order: [['id', 'DESC']],
		limit: Math.max(1, Math.min(limit, 1000))
	});
	return rows.map(toDto);
}

function toDto(r: AuditEvent): AuditEventDto {
	return {
		id: Number(r.id),
		at: new Date(r.at).toISOString(),
		actorId: r.actor_id,
		actorEmail: r.actor_email,
		action: r.action,
		entityType: r.entity_type,
		entityId: r.entity_id,
		before: r.before,
		after: r.after,
		ip: r.ip
	};
}
