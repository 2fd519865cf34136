/**
 * What the workflow services (`revisions.ts`, `tuning-sets.ts`) share: who is acting, the typed
 * errors of refused transitions and edit conflicts, the test-only failure hook, and small helpers.
 * Relative imports only.
 */
import type { Transaction } from 'sequelize';
import { PermissionDenied, type Role } from '../auth/roles';
import { Conflict, InvalidInput } from './errors';
import type { Decision } from '../workflow/state-machine';
import { recordAudit } from './audit';
import { notifyAuthorOfDecision, type AuthorDecisionNotice } from './mail/outbox';

/** Who is acting: the signed-in person (id, email, name, current role) and their client address. */
export interface Acting {
	user: { id: number; email: string; name: string; role: Role };
	ip?: string | null;
}

/** Named points inside a workflow write, in the order they are reached. */
export type WorkflowStep = 'revision_saved' | 'model_updated' | 'audit_recorded' | 'outbox_queued';

/** Options of every workflow write. */
export interface WriteOptions {
	/**
	 * Test-only failure hook: called inside the transaction at each named step; throwing there
	 * simulates a crash in the middle of the write (everything must roll back).
	 */
	onStep?: (step: WorkflowStep) => void | Promise<void>;
}

/** A transition refused because of the current state (HTTP 409), e.g. approving an approved revision. */
export class WorkflowConflict extends Conflict {
	constructor(message: string) {
		super(message);
		this.name = 'WorkflowConflict';
	}
}

/**
 * Someone else saved the same draft since this editor loaded it (HTTP 409). Nothing was written;
 * `current` is what is stored now and `rejected` is what this editor tried to save, so the UI can
 * show both and the editor can merge — nothing is lost.
 */
export class ConflictError<T = unknown> extends Conflict {
	constructor(
		message: string,
		readonly current: { version: number; updatedAt: string; updatedBy: { id: number; name: string } | null; values: T },
		readonly rejected: T,
		/** Fields whose stored value differs from the rejected one. */
		readonly differingFields: string[]
	) {
		super(message);
		this.name = 'ConflictError';
	}
}

/** Throws the typed error of a refused decision: PermissionDenied (403), WorkflowConflict (409) or InvalidInput (422). */
export function enforce(decision: Decision): asserts decision is Extract<Decision, { ok: true }> {
	if (decision.ok) return;
	if (decision.error === 'permission') throw new PermissionDenied(decision.permission ?? 'revision.review', decision.message);
	if (decision.error === 'input') throw new InvalidInput(decision.field ?? '_form', decision.message);
	throw new WorkflowConflict(decision.message);
}

/** Runs the test-only hook, if any. */
export async function step(options: WriteOptions | undefined, name: WorkflowStep): Promise<void> {
	if (options?.onStep) await options.onStep(name);
}

/** ISO 8601 UTC timestamp of a database date (or null). */
export function isoOrNull(v: Date | string | null | undefined): string | null {
	if (v === null || v === undefined) return null;
	const d = v instanceof Date ? v : new Date(`${String(v).replace(' ', 'T')}${/[zZ]|[+-]\d\d:?\d\d$/.test(String(v)) ? '' : 'Z'}`);
	return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

/** The UTC calendar date of `now` as YYYY-MM-DD. */
export function utcToday(now: Date = new Date()): string {
	return now.toISOString().slice(0, 10);
}

/** Whole days from the UTC date `from` to the UTC date `to` (both YYYY-MM-DD); negative when `to` is earlier. */
export function daysFromTo(from: string, to: string): number {
	return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);
}

/** Marker type of the transaction every helper below needs. */
export type Tx = Transaction;

/** The actor and client address of an audit event for `acting`. */
export function auditActor(acting: Acting): { actor: { id: number; email: string }; ip: string | null } {
	return { actor: { id: acting.user.id, email: acting.user.email }, ip: acting.ip ?? null };
}

/**
 * The common end of a review decision (approve or send back) on a revision or a tuning set, once
 * its new state is saved in `transaction`: the audit event, then the mail to the author, each
 * followed by its injectable failure point (`audit_recorded`, `outbox_queued`).
 */
export async function recordReviewDecision(
	transaction: Transaction,
	acting: Acting,
	options: WriteOptions | undefined,
	event: { action: string; entityType: string; entityId: number; before: Record<string, unknown>; after: Record<string, unknown> },
	notice: AuthorDecisionNotice
): Promise<void> {
	await recordAudit(transaction, { ...auditActor(acting), ...event });
	await step(options, 'audit_recorded');
	await notifyAuthorOfDecision(transaction, notice);
	await step(options, 'outbox_queued');
}
