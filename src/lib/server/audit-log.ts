/**
 * Reading the audit log for administrators: filter by actor, action, entity and a date range, a
 * page at a time, and the same filters streamed in batches for the CSV export. Read-only: the log
 * is append-only (`audit.ts` writes it; triggers refuse updates and deletes), so nothing here
 * writes. Every function checks `audit.read` itself. Relative imports only.
 */
import { Op, type WhereOptions } from 'sequelize';
import { AuditEvent, initModels } from './db/models';
import { assertCan } from '../auth/roles';
import type { Acting } from './workflow-common';
import type { AuditEventDto } from './audit';

/** Filters of the audit log; all optional and combined with AND. Dates are UTC calendar days. */
export interface AuditFilter {
	/** Part of the actor's e-mail address (case-insensitive); `system` finds events without an actor. */
	actor?: string;
	/** An exact action (`revision.approve`) or every action under a prefix (`revision.*`). */
	action?: string;
	/** Entity type, e.g. `model_revision`. */
	entityType?: string;
	/** Entity id, exact. */
	entityId?: string;
	/** First day included, `YYYY-MM-DD` (from 00:00 UTC). */
	from?: string;
	/** Last day included, `YYYY-MM-DD` (to 24:00 UTC). */
	to?: string;
}

/** One page of the audit log. */
export interface AuditPage {
	items: AuditEventDto[];
	/** Events matching the filters. */
	total: number;
	/** 1-based page number shown (clamped to the last page). */
	page: number;
	pageSize: number;
	pageCount: number;
}

/** What the filter lists offer: the actions and entity types present in the log. */
export interface AuditFacets {
	actions: string[];
	entityTypes: string[];
}

/** Rows per page of the audit page. */
export const AUDIT_PAGE_SIZE = 50;
/** Most rows one CSV export writes (newest first); the page says so when a filter matches more. */
export const AUDIT_EXPORT_MAX_ROWS = 100_000;

const DAY_MS = 86_400_000;

/** The Sequelize condition of a filter (exported for the integration test's cross-check). */
export function auditWhere(filter: AuditFilter): WhereOptions {
	const and: WhereOptions[] = [];
	const actor = filter.actor?.trim();
	if (actor) {
		if (actor.toLowerCase() === 'system') and.push({ actor_id: null });
		else and.push({ actor_email: { [Op.substring]: actor } });
	}
	const action = filter.action?.trim();
	if (action) {
		if (action.endsWith('.*')) and.push({ action: { [Op.startsWith]: action.slice(0, -1) } });
		else and.push({ action });
	}
	if (filter.entityType) and.push({ entity_type: filter.entityType });
	if (filter.entityId) and.push({ entity_id: filter.entityId });
	if (filter.from) and.push({ at: { [Op.gte]: new Date(`${filter.from}T00:00:00.000Z`) } });
	if (filter.to) and.push({ at: { [Op.lt]: new Date(Date.parse(`${filter.to}T00:00:00.000Z`) + DAY_MS) } });
	return and.length ? { [Op.and]: and } : {};
}

function parsedJson(v: unknown): unknown {
	if (typeof v !== 'string') return v ?? null;
	try {
		return JSON.parse(v);
	} catch {
		return v;
	}
}

function toDto(r: AuditEvent): AuditEventDto {
	return {
		id: Number(r.id),
		at: new Date(r.at).toISOString(),
		actorId: r.actor_id === null ? null : Number(r.actor_id),
		actorEmail: r.actor_email,
		action: r.action,
		entityType: r.entity_type,
		entityId: r.entity_id,
		before: parsedJson(r.before),
		after: parsedJson(r.after),
		ip: r.ip
	};
}

/** One page of audit events matching `filter`, newest first. Administrators only. */
export async function searchAudit(acting: Acting, filter: AuditFilter, page = 1, pageSize = AUDIT_PAGE_SIZE): Promise<AuditPage> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const size = Math.max(1, Math.min(Math.floor(pageSize), 500));
	const where = auditWhere(filter);
	const total = await AuditEvent.count({ where });
	const pageCount = Math.max(1, Math.ceil(total / size));
	const shown = Math.min(Math.max(1, Math.floor(page) || 1), pageCount);
	const rows = await AuditEvent.findAll({ where, order: [['id', 'DESC']], limit: size, offset: (shown - 1) * size });
	return { items: rows.map(toDto), total, page: shown, pageSize: size, pageCount };
}

/** The actions and entity types present in the log, sorted, for the filter lists. Administrators only. */
export async function auditFacets(acting: Acting): Promise<AuditFacets> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const [actions, types] = await Promise.all([
		AuditEvent.findAll({ attributes: ['action'], group: ['action'], order: [['action', 'ASC']], raw: true }),
		AuditEvent.findAll({ attributes: ['entity_type'], group: ['entity_type'], order: [['entity_type', 'ASC']], raw: true })
	]);
	return {
		actions: actions.map((a) => String((a as { action: string }).action)),
		entityTypes: types.map((t) => String((t as { entity_type: string }).entity_type))
	};
}

/**
 * Every event matching `filter`, newest first, in batches of `batchSize` (keyset paging on the id,
 * so a long export neither skips nor repeats rows while others write), at most `maxRows`.
 * Administrators only (checked before the first batch).
 */
export async function* auditBatches(
	acting: Acting,
	filter: AuditFilter,
	options: { batchSize?: number; maxRows?: number } = {}
): AsyncGenerator<AuditEventDto[]> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const batch = Math.max(1, Math.min(options.batchSize ?? 1000, 5000));
	let left = Math.max(0, options.maxRows ?? AUDIT_EXPORT_MAX_ROWS);
	const base = auditWhere(filter);
	let below: number | null = null;
	while (left > 0) {
		const where: WhereOptions = below === null ? base : { [Op.and]: [base, { id: { [Op.lt]: below } }] };
		const rows: AuditEvent[] = await AuditEvent.findAll({ where, order: [['id', 'DESC']], limit: Math.min(batch, left) });
		if (rows.length === 0) return;
		left -= rows.length;
		below = Number(rows[rows.length - 1].id);
		yield rows.map(toDto);
		if (rows.length < batch) return;
	}
}
