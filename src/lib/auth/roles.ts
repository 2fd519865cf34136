/**
 * Roles and permissions of PRODUCT.md ("Who uses it, and for what"), as pure functions usable on
 * the server and in the browser. Routes guard by route group in `hooks.server.ts`; every service
 * checks again with `assertCan` (and, for reviews, `canReview`), so a forgotten guard never opens
 * a write.
 */

/** The four roles of PRODUCT.md, least to most privileged in administration. */
export const ROLES = ['viewer', 'engineer', 'reviewer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

/** Plain-language names of the roles, for the UI. */
export const ROLE_LABELS: Record<Role, string> = {
	viewer: 'Viewer',
	engineer: 'Engineer',
	reviewer: 'Reviewer',
	admin: 'Administrator'
};

/** True when `value` is one of the four role names. */
export function isRole(value: unknown): value is Role {
	return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/**
 * Every permission the product knows, named by what the person does. Keep this list and the
 * grant table below in step with PRODUCT.md; the unit test walks every role × action.
 */
export const ACTIONS = [
	// viewer: read approved models and tunings, run the calculator
	'model.read',
	'tuning.read',
	'bench.run',
	'profile.edit_own',
	'token.manage_own',
	// engineer: create models, propose revisions, upload, fit, save tuning sets as drafts
	'model.read_draft',
	'model.create',
	'revision.propose',
	'attachment.upload',
	'model.fit',
	'tuning.save_draft',
	'note.write',
	'asset.create',
	// reviewer: approve or send back other people's revisions and tuning sets
	'revision.review',
	'tuning.review',
	'model.withdraw',
	// admin: manage users, roles, sites and areas (never review)
	'user.manage',
	'site.manage',
	'area.manage',
	'audit.read'
] as const;
export type Action = (typeof ACTIONS)[number];

const VIEWER: readonly Action[] = ['model.read', 'tuning.read', 'bench.run', 'profile.edit_own', 'token.manage_own'];
const ENGINEER: readonly Action[] = [
	...VIEWER,
	'model.read_draft',
	'model.create',
	'revision.propose',
	'attachment.upload',
	'model.fit',
	'tuning.save_draft',
	'note.write',
	'asset.create'
];
const REVIEWER: readonly Action[] = [...ENGINEER, 'revision.review', 'tuning.review', 'model.withdraw'];
/**
 * An administrator reads like a viewer (drafts included) and runs the administration; no review.
 * Issue 5 lets an admin withdraw (retire) a model with a reason — retiring is not approving.
 */
const ADMIN: readonly Action[] = [
	...VIEWER,
	'model.read_draft',
	'model.withdraw',
	'asset.create',
	'user.manage',
	'site.manage',
	'area.manage',
	'audit.read'
];

const GRANTS: Record<Role, ReadonlySet<Action>> = {
	viewer: new Set(VIEWER),
	engineer: new Set(ENGINEER),
	reviewer: new Set(REVIEWER),
	admin: new Set(ADMIN)
};

/** True when a person with `role` may perform `action` (PRODUCT.md role table). Unknown roles may do nothing. */
export function can(role: Role | null | undefined, action: Action): boolean {
	if (!role || !isRole(role)) return false;
	return GRANTS[role].has(action);
}

/** Thrown by `assertCan`/`assertCanReview`; services let it through and routes answer 403. */
export class PermissionDenied extends Error {
	readonly status = 403 as const;
	constructor(
		readonly action: Action,
		message = 'You do not have permission to do this.'
	) {
		super(message);
		this.name = 'PermissionDenied';
	}
}

/** Throws `PermissionDenied` unless `role` may perform `action`. */
export function assertCan(role: Role | null | undefined, action: Action): void {
	if (!can(role, action)) throw new PermissionDenied(action);
}

/**
 * Four-eyes rule: true when `reviewer` may approve or send back work authored by `authorId`
 * (a reviewer, and not the author). `contributorIds` are others who edited the same revision; they
 * may not review it either.
 */
export function canReview(
	reviewer: { id: number; role: Role } | null | undefined,
	authorId: number,
	contributorIds: readonly number[] = []
): boolean {
	if (!reviewer || !can(reviewer.role, 'revision.review')) return false;
	return reviewer.id !== authorId && !contributorIds.includes(reviewer.id);
}

/** Throws `PermissionDenied` unless `canReview(...)` holds, with a message saying why. */
export function assertCanReview(
	reviewer: { id: number; role: Role } | null | undefined,
	authorId: number,
	contributorIds: readonly number[] = []
): void {
	if (!reviewer || !can(reviewer.role, 'revision.review')) {
		throw new PermissionDenied('revision.review', 'Only reviewers can approve or send back revisions.');
	}
	if (!canReview(reviewer, authorId, contributorIds)) {
		throw new PermissionDenied('revision.review', 'You cannot review your own work; ask another reviewer.');
	}
}
