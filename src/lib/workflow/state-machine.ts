/**
 * The review workflow of plant-model revisions and tuning sets as one pure decision function.
 * Every write of the workflow services asks `decide(transition, context)` first; nothing else
 * decides whether a transition is allowed. Pure TypeScript with relative imports only, so the UI
 * can call it to show or hide a button with exactly the rule the server applies.
 *
 * States (PRODUCT.md, "Revision"):
 *
 *     draft ──submit──▶ in_review ──approve──▶ approved ──(a newer one is approved)──▶ superseded
 *       ▲                   │
 *       └──edit── changes_requested ◀──request_changes
 *
 *   - `edit` saves a draft or a changes-requested revision; the result is always `draft`, and the
 *     person who saved becomes a contributor of the revision.
 *   - `discard` ends an open revision (draft or changes requested) that its author or a
 *     contributor no longer wants; it ends `withdrawn`.
 *   - `withdraw` retires a whole model (reviewer or administrator, with a reason): its open
 *     revisions end `withdrawn`.
 *   - `revalidate` re-approves an unchanged model with a new revalidate-by date, recorded as a new
 *     revision that is `approved` at once (a review act: reviewers only, four-eyes applies).
 *
 * Four-eyes: nobody approves, sends back or revalidates work they authored or co-edited
 * (contributors are everyone who saved the revision). Reviewing — approving or sending back — does
 * NOT make someone a contributor: a reviewer who sent a revision back may approve it after the
 * author's edits, as long as the reviewer did not save an edit of it themselves.
 * Administrators manage people and places; they cannot approve at all (PRODUCT.md role table).
 */
import { can, type Action, type Role } from '../auth/roles';

/** States of a model revision or a tuning set (the `state` column of both tables). */
export const WORKFLOW_STATES = ['draft', 'in_review', 'changes_requested', 'approved', 'superseded', 'withdrawn'] as const;
/** One of the six workflow states. */
export type WorkflowState = (typeof WORKFLOW_STATES)[number];

/** Every transition of the workflow. */
export const TRANSITIONS = [
	'create',
	'revise',
	'edit',
	'submit',
	'approve',
	'request_changes',
	'discard',
	'withdraw',
	'revalidate'
] as const;
/** One of the workflow transitions. */
export type Transition = (typeof TRANSITIONS)[number];

/** What is being moved through the workflow: a model revision or a tuning set. */
export type WorkflowSubject = 'model' | 'tuning_set';

/** States in which a revision is still being worked on (at most one per model). */
export const OPEN_STATES: readonly WorkflowState[] = ['draft', 'in_review', 'changes_requested'];

/** Plain-language names of the states, for messages and the UI. */
export const STATE_LABELS: Record<WorkflowState, string> = {
	draft: 'draft',
	in_review: 'in review',
	changes_requested: 'changes requested',
	approved: 'approved',
	superseded: 'superseded',
	withdrawn: 'withdrawn'
};

/** Everything `decide` needs to know; fields a transition does not use may be left out. */
export interface DecisionContext {
	/** Model revision (default) or tuning set. */
	subject?: WorkflowSubject;
	/** The acting person's current role (null: signed out). */
	role: Role | null | undefined;
	actorId: number;
	/** Author of the revision or tuning set acted on (for `revalidate`: of the approved revision). */
	authorId?: number | null;
	/** Everyone who saved the revision (the author included or not; both work). */
	contributorIds?: readonly number[];
	/** Current state of the revision or tuning set (not used by `create`, `revise`, `withdraw`). */
	state?: WorkflowState | null;
	/** Status of the plant model. */
	modelStatus?: 'draft' | 'active' | 'withdrawn' | null;
	/** The model has an approved revision (needed by `revise`, `revalidate` and tuning-set `create`). */
	hasApprovedRevision?: boolean;
	/** An open revision of the model, if any (`revise` refuses while one exists). */
	openRevision?: { no: number; state: WorkflowState } | null;
	/** Review comment (`approve`, `request_changes`, `revalidate`). */
	comment?: string | null;
	/** Reason for retiring the model (`withdraw`). */
	reason?: string | null;
	/** Why this change counts as large (from `largeChanges`); non-empty makes a comment compulsory. */
	largeChangeReasons?: readonly string[];
}

/** Why a transition was refused: permission → HTTP 403, state → 409, input → 422 (with the field). */
export type DecisionError = 'permission' | 'state' | 'input';

/** The verdict: allowed (with the state the revision ends in), or refused with a reason to show. */
export type Decision =
	| { ok: true; to: WorkflowState }
	| { ok: false; error: DecisionError; message: string; field?: string; permission?: Action };

const PROPOSE: Record<WorkflowSubject, Action> = { model: 'revision.propose', tuning_set: 'tuning.save_draft' };
const REVIEW: Record<WorkflowSubject, Action> = { model: 'revision.review', tuning_set: 'tuning.review' };
const NOUN: Record<WorkflowSubject, string> = { model: 'revision', tuning_set: 'tuning set' };

const refuse = (error: DecisionError, message: string, extra: { field?: string; permission?: Action } = {}): Decision => ({
	ok: false,
	error,
	message,
	...extra
});
const allow = (to: WorkflowState): Decision => ({ ok: true, to });
const blank = (s: string | null | undefined) => !s || s.trim().length === 0;
const isContributor = (ctx: DecisionContext) =>
	ctx.authorId === ctx.actorId || (ctx.contributorIds ?? []).includes(ctx.actorId);

function needRole(ctx: DecisionContext, action: Action, message: string): Decision | null {
	if (can(ctx.role, action)) return null;
	return refuse('permission', message, { permission: action });
}

function reviewerCheck(ctx: DecisionContext, verb: string): Decision | null {
	const subject = ctx.subject ?? 'model';
	const action = REVIEW[subject];
	if (ctx.role === 'admin') {
		return refuse(
			'permission',
			`Administrators cannot ${verb}: review needs the reviewer role, and an administrator cannot bypass review.`,
			{ permission: action }
		);
	}
	const denied = needRole(ctx, action, `Only reviewers can ${verb}.`);
	if (denied) return denied;
	if (ctx.authorId === ctx.actorId) {
		return refuse('permission', `You wrote this ${NOUN[subject]}, so you cannot ${verb}; ask another reviewer (four-eyes rule).`, {
			permission: action
		});
	}
	if ((ctx.contributorIds ?? []).includes(ctx.actorId)) {
		return refuse('permission', `You edited this ${NOUN[subject]}, so you cannot ${verb}; ask another reviewer (four-eyes rule).`, {
			permission: action
		});
	}
	return null;
}

function stateIs(ctx: DecisionContext, allowed: readonly WorkflowState[], message: (s: string) => string): Decision | null {
	const s = ctx.state ?? null;
	if (s !== null && allowed.includes(s)) return null;
	return refuse('state', message(s === null ? 'unknown' : STATE_LABELS[s]));
}

/**
 * Decides one workflow transition for one person. Checks, in this order: the model is not
 * withdrawn (state), the role may do it (permission), the current state allows it (state),
 * ownership and four-eyes (permission), then the inputs the transition needs (input: a comment
 * for large changes and for sending back, a reason for withdrawing). Returns the state the
 * revision or tuning set ends in when allowed.
 */
export function decide(transition: Transition, ctx: DecisionContext): Decision {
	const subject = ctx.subject ?? 'model';
	const noun = NOUN[subject];
	if (ctx.modelStatus === 'withdrawn') {
		return refuse('state', 'This model has been withdrawn; it can no longer change.');
	}
	switch (transition) {
		case 'create': {
			const denied = needRole(
				ctx,
				subject === 'model' ? 'model.create' : 'tuning.save_draft',
				subject === 'model' ? 'Only engineers and reviewers can create models.' : 'Only engineers and reviewers can save tuning sets.'
			);
			if (denied) return denied;
			if (subject === 'tuning_set' && (!ctx.hasApprovedRevision || ctx.modelStatus !== 'active')) {
				return refuse('state', 'A tuning set is saved against an approved model revision; this model has none yet.');
			}
			return allow('draft');
		}
		case 'revise': {
			const denied = needRole(ctx, PROPOSE[subject], 'Only engineers and reviewers can propose revisions.');
			if (denied) return denied;
			if (!ctx.hasApprovedRevision || ctx.modelStatus !== 'active') {
				return refuse('state', 'A new revision starts from the approved one; this model has no approved revision yet — edit its draft instead.');
			}
			if (ctx.openRevision) {
				return refuse(
					'state',
					`Revision ${ctx.openRevision.no} is already open (${STATE_LABELS[ctx.openRevision.state]}); continue that one instead of starting another.`
				);
			}
			return allow('draft');
		}
		case 'edit': {
			const denied = needRole(ctx, PROPOSE[subject], `Only engineers and reviewers can edit a ${noun}.`);
			if (denied) return denied;
			return (
				stateIs(ctx, ['draft', 'changes_requested'], (s) =>
					s === 'approved' || s === 'superseded'
						? `An approved ${noun} cannot change; start a new one from it.`
						: `Only a draft or a ${noun} sent back for changes can be edited; this one is ${s}.`
				) ?? allow('draft')
			);
		}
		case 'submit': {
			const denied = needRole(ctx, PROPOSE[subject], `Only engineers and reviewers can submit a ${noun} for review.`);
			if (denied) return denied;
			const wrong = stateIs(ctx, ['draft'], (s) =>
				s === 'changes requested'
					? `This ${noun} was sent back: save your changes first, then submit it again.`
					: `Only a draft can be submitted for review; this ${noun} is ${s}.`
			);
			if (wrong) return wrong;
			if (!isContributor(ctx)) {
				return refuse('permission', `Only the author or someone who edited this ${noun} can submit it for review.`, {
					permission: PROPOSE[subject]
				});
			}
			return allow('in_review');
		}
		case 'approve':
		case 'request_changes': {
			const verb = transition === 'approve' ? `approve this ${noun}` : `send this ${noun} back`;
			const roleDenied = reviewerCheck({ ...ctx, authorId: null, contributorIds: [] }, verb);
			if (roleDenied) return roleDenied;
			const wrong = stateIs(ctx, ['in_review'], (s) => `Only a ${noun} in review can be approved or sent back; this one is ${s}.`);
			if (wrong) return wrong;
			const denied = reviewerCheck(ctx, verb);
			if (denied) return denied;
			if (transition === 'request_changes') {
				if (blank(ctx.comment)) return refuse('input', 'Say what needs to change before sending it back.', { field: 'comment' });
				return allow('changes_requested');
			}
			const reasons = ctx.largeChangeReasons ?? [];
			if (reasons.length > 0 && blank(ctx.comment)) {
				return refuse('input', `A review comment is required for a large change: ${reasons.join('; ')}.`, { field: 'comment' });
			}
			return allow('approved');
		}
		case 'discard': {
			const denied = needRole(ctx, PROPOSE[subject], `Only engineers and reviewers can discard a ${noun}.`);
			if (denied) return denied;
			const wrong = stateIs(ctx, ['draft', 'changes_requested'], (s) => `Only a draft or a ${noun} sent back can be discarded; this one is ${s}.`);
			if (wrong) return wrong;
			if (!isContributor(ctx)) {
				return refuse('permission', `Only the author or someone who edited this ${noun} can discard it.`, { permission: PROPOSE[subject] });
			}
			return allow('withdrawn');
		}
		case 'withdraw': {
			if (ctx.role !== 'admin' && !can(ctx.role, 'model.withdraw')) {
				return refuse('permission', 'Only reviewers and administrators can withdraw a model.', { permission: 'model.withdraw' });
			}
			if (blank(ctx.reason)) return refuse('input', 'Give the reason the model is withdrawn.', { field: 'reason' });
			return allow('withdrawn');
		}
		case 'revalidate': {
			const roleDenied = reviewerCheck({ ...ctx, authorId: null, contributorIds: [] }, 'revalidate this model');
			if (roleDenied) return roleDenied;
			if (!ctx.hasApprovedRevision || ctx.modelStatus !== 'active') {
				return refuse('state', 'Only a model with an approved revision can be revalidated.');
			}
			const denied = reviewerCheck(ctx, 'revalidate this model');
			if (denied) return denied;
			return allow('approved');
		}
	}
}

/** True when `decide` allows the transition (for showing or hiding a control). */
export function allowed(transition: Transition, ctx: DecisionContext): boolean {
	return decide(transition, ctx).ok;
}
