/**
 * The workflow state machine, table-driven: every transition × role × state, for model revisions
 * and tuning sets. Expectations are written from PRODUCT.md ("Who uses it", "Revision"): viewers
 * and administrators never propose or review; engineers propose; reviewers also review, never
 * their own or co-edited work (four-eyes); withdrawing a model is for reviewers and
 * administrators; an approved revision never changes.
 */
import { describe, expect, it } from 'vitest';
import { decide, TRANSITIONS, WORKFLOW_STATES, type DecisionContext, type Transition, type WorkflowState } from './state-machine';
import { ROLES, type Role } from '../auth/roles';

const AUTHOR = 10;
const CO_EDITOR = 11;
const OTHER = 20;

/** Who may propose (create, revise, edit, submit, discard): PRODUCT.md role table. */
const PROPOSES: Record<Role, boolean> = { viewer: false, engineer: true, reviewer: true, admin: false };
/** Who may approve or send back. */
const REVIEWS: Record<Role, boolean> = { viewer: false, engineer: false, reviewer: true, admin: false };
/** Who may withdraw a model. */
const WITHDRAWS: Record<Role, boolean> = { viewer: false, engineer: false, reviewer: true, admin: true };

/** States from which each transition on an existing revision may start. */
const FROM: Partial<Record<Transition, readonly WorkflowState[]>> = {
	edit: ['draft', 'changes_requested'],
	submit: ['draft'],
	approve: ['in_review'],
	request_changes: ['in_review'],
	discard: ['draft', 'changes_requested']
};
/** The state each allowed transition ends in. */
const TO: Record<Transition, WorkflowState> = {
	create: 'draft',
	revise: 'draft',
	edit: 'draft',
	submit: 'in_review',
	approve: 'approved',
	request_changes: 'changes_requested',
	discard: 'withdrawn',
	withdraw: 'withdrawn',
	revalidate: 'approved'
};

function context(role: Role, state: WorkflowState, actorId: number, subject: 'model' | 'tuning_set'): DecisionContext {
	return {
		subject,
		role,
		actorId,
		authorId: AUTHOR,
		contributorIds: [AUTHOR, CO_EDITOR],
		state,
		modelStatus: 'active',
		hasApprovedRevision: true,
		openRevision: null,
		comment: 'Checked against the step-test record.',
		reason: 'Asset replaced.',
		largeChangeReasons: []
	};
}

describe.each(['model', 'tuning_set'] as const)('every state-bound transition × role × state (%s)', (subject) => {
	for (const transition of ['edit', 'submit', 'approve', 'request_changes', 'discard'] as const) {
		const reviewing = transition === 'approve' || transition === 'request_changes';
		for (const role of ROLES) {
			for (const state of WORKFLOW_STATES) {
				// Proposers act as the author; reviewers act as someone else.
				const actor = reviewing ? OTHER : AUTHOR;
				const roleOk = reviewing ? REVIEWS[role] : PROPOSES[role];
				const stateOk = FROM[transition]!.includes(state);
				const expected = roleOk && stateOk ? 'ok' : roleOk ? 'state' : 'permission';
				it(`${transition} by ${role} on ${state} → ${expected}`, () => {
					const d = decide(transition, context(role, state, actor, subject));
					if (expected === 'ok') expect(d).toEqual({ ok: true, to: TO[transition] });
					else {
						expect(d.ok).toBe(false);
						if (!d.ok) {
							expect(d.error).toBe(expected);
							expect(d.message.length).toBeGreaterThan(10);
						}
					}
				});
			}
		}
	}
});

describe('model-level transitions × role', () => {
	for (const role of ROLES) {
		it(`create by ${role}`, () => {
			const d = decide('create', { role, actorId: OTHER });
			expect(d.ok).toBe(PROPOSES[role]);
			if (!d.ok) expect(d.error).toBe('permission');
		});
		it(`revise by ${role}`, () => {
			const d = decide('revise', { role, actorId: OTHER, modelStatus: 'active', hasApprovedRevision: true, openRevision: null });
			expect(d.ok).toBe(PROPOSES[role]);
		});
		it(`withdraw by ${role}`, () => {
			const d = decide('withdraw', { role, actorId: OTHER, modelStatus: 'active', reason: 'Asset replaced.' });
			expect(d.ok).toBe(WITHDRAWS[role]);
			if (d.ok) expect(d.to).toBe('withdrawn');
			else expect(d.error).toBe('permission');
		});
		it(`revalidate by ${role} (not the author)`, () => {
			const d = decide('revalidate', { role, actorId: OTHER, authorId: AUTHOR, contributorIds: [AUTHOR], modelStatus: 'active', hasApprovedRevision: true });
			expect(d.ok).toBe(REVIEWS[role]);
		});
	}

	it('revise is refused while another revision is open, naming it', () => {
		const d = decide('revise', { role: 'engineer', actorId: OTHER, modelStatus: 'active', hasApprovedRevision: true, openRevision: { no: 4, state: 'in_review' } });
		expect(d).toMatchObject({ ok: false, error: 'state' });
		if (!d.ok) expect(d.message).toMatch(/Revision 4 is already open \(in review\)/);
	});
	it('revise needs an approved revision', () => {
		expect(decide('revise', { role: 'engineer', actorId: OTHER, modelStatus: 'draft', hasApprovedRevision: false })).toMatchObject({ ok: false, error: 'state' });
	});
	it('a tuning set needs an approved model revision', () => {
		expect(decide('create', { subject: 'tuning_set', role: 'engineer', actorId: OTHER, modelStatus: 'draft', hasApprovedRevision: false })).toMatchObject({
			ok: false,
			error: 'state'
		});
		expect(decide('create', { subject: 'tuning_set', role: 'engineer', actorId: OTHER, modelStatus: 'active', hasApprovedRevision: true })).toEqual({
			ok: true,
			to: 'draft'
		});
	});
	it('withdraw needs a reason (input error on the field "reason")', () => {
		expect(decide('withdraw', { role: 'reviewer', actorId: OTHER, modelStatus: 'active', reason: '  ' })).toMatchObject({ ok: false, error: 'input', field: 'reason' });
	});
	it('revalidate needs an approved revision', () => {
		expect(decide('revalidate', { role: 'reviewer', actorId: OTHER, authorId: AUTHOR, modelStatus: 'draft', hasApprovedRevision: false })).toMatchObject({
			ok: false,
			error: 'state'
		});
	});

	it('nothing at all happens to a withdrawn model', () => {
		for (const t of TRANSITIONS) {
			for (const role of ROLES) {
				const d = decide(t, { ...context(role, 'draft', OTHER, 'model'), modelStatus: 'withdrawn' });
				expect(d).toMatchObject({ ok: false, error: 'state' });
			}
		}
	});
});

describe('four-eyes', () => {
	const inReview = (actorId: number, role: Role = 'reviewer') => context(role, 'in_review', actorId, 'model');

	it('a reviewer cannot approve their own revision', () => {
		const d = decide('approve', inReview(AUTHOR));
		expect(d).toMatchObject({ ok: false, error: 'permission' });
		if (!d.ok) expect(d.message).toMatch(/You wrote this revision.*four-eyes/);
	});
	it('a reviewer cannot approve a revision they co-edited', () => {
		const d = decide('approve', inReview(CO_EDITOR));
		expect(d).toMatchObject({ ok: false, error: 'permission' });
		if (!d.ok) expect(d.message).toMatch(/You edited this revision.*four-eyes/);
	});
	it('nor send it back', () => {
		expect(decide('request_changes', inReview(AUTHOR))).toMatchObject({ ok: false, error: 'permission' });
		expect(decide('request_changes', inReview(CO_EDITOR))).toMatchObject({ ok: false, error: 'permission' });
	});
	it('a reviewer who only sent it back earlier (never saved it) may approve the resubmission', () => {
		// The first reviewer's id is not among the contributors: reviewing does not make one.
		const firstReviewer = 30;
		expect(decide('approve', { ...inReview(firstReviewer), contributorIds: [AUTHOR] })).toEqual({ ok: true, to: 'approved' });
	});
	it('once that reviewer saves an edit of the draft they become a contributor and may not approve it', () => {
		const firstReviewer = 30;
		expect(decide('approve', { ...inReview(firstReviewer), contributorIds: [AUTHOR, firstReviewer] })).toMatchObject({ ok: false, error: 'permission' });
	});
	it('a reviewer cannot revalidate a model whose approved revision they wrote or edited', () => {
		expect(decide('revalidate', { role: 'reviewer', actorId: AUTHOR, authorId: AUTHOR, modelStatus: 'active', hasApprovedRevision: true })).toMatchObject({ ok: false, error: 'permission' });
		expect(
			decide('revalidate', { role: 'reviewer', actorId: CO_EDITOR, authorId: AUTHOR, contributorIds: [CO_EDITOR], modelStatus: 'active', hasApprovedRevision: true })
		).toMatchObject({ ok: false, error: 'permission' });
	});
	it('administrators cannot bypass review: never approve, with a message saying so', () => {
		const d = decide('approve', inReview(OTHER, 'admin'));
		expect(d).toMatchObject({ ok: false, error: 'permission', permission: 'revision.review' });
		if (!d.ok) expect(d.message).toMatch(/Administrators cannot approve/);
		const t = decide('approve', { ...context('admin', 'in_review', OTHER, 'tuning_set') });
		expect(t).toMatchObject({ ok: false, error: 'permission', permission: 'tuning.review' });
	});
	it('submitting is for the author or a contributor only', () => {
		expect(decide('submit', context('engineer', 'draft', CO_EDITOR, 'model'))).toEqual({ ok: true, to: 'in_review' });
		expect(decide('submit', context('engineer', 'draft', OTHER, 'model'))).toMatchObject({ ok: false, error: 'permission' });
		expect(decide('discard', context('engineer', 'draft', OTHER, 'model'))).toMatchObject({ ok: false, error: 'permission' });
	});
	it('anyone who proposes may edit someone else’s draft (and so becomes a contributor)', () => {
		expect(decide('edit', context('engineer', 'draft', OTHER, 'model'))).toEqual({ ok: true, to: 'draft' });
	});
});

describe('comments', () => {
	const approving = (comment: string | null, reasons: string[]) => ({ ...context('reviewer', 'in_review', OTHER, 'model'), comment, largeChangeReasons: reasons });

	it('a large change cannot be approved without a comment; the message names the reason', () => {
		const d = decide('approve', approving(null, ['gain K changed by −35 % (0.81 → 0.53)']));
		expect(d).toMatchObject({ ok: false, error: 'input', field: 'comment' });
		if (!d.ok) expect(d.message).toMatch(/gain K changed by −35 %/);
		expect(decide('approve', approving('   ', ['structure changed']))).toMatchObject({ ok: false, field: 'comment' });
	});
	it('with a comment it can', () => {
		expect(decide('approve', approving('New nozzles explain the lower gain.', ['gain K changed by −35 %']))).toEqual({ ok: true, to: 'approved' });
	});
	it('a small change needs no comment', () => {
		expect(decide('approve', approving(null, []))).toEqual({ ok: true, to: 'approved' });
	});
	it('sending back always needs a comment', () => {
		expect(decide('request_changes', approving(null, []))).toMatchObject({ ok: false, error: 'input', field: 'comment' });
		expect(decide('request_changes', approving('Fit R² is missing.', []))).toEqual({ ok: true, to: 'changes_requested' });
	});
});

describe('messages', () => {
	it('an approved revision is immutable: editing it says to start a new one', () => {
		const d = decide('edit', context('engineer', 'approved', AUTHOR, 'model'));
		expect(d).toMatchObject({ ok: false, error: 'state' });
		if (!d.ok) expect(d.message).toMatch(/cannot change; start a new one/);
	});
	it('a sent-back revision must be saved before it is submitted again', () => {
		const d = decide('submit', context('engineer', 'changes_requested', AUTHOR, 'model'));
		expect(d).toMatchObject({ ok: false, error: 'state' });
		if (!d.ok) expect(d.message).toMatch(/save your changes first/);
	});
	it('tuning-set messages speak of tuning sets', () => {
		const d = decide('approve', context('reviewer', 'in_review', AUTHOR, 'tuning_set'));
		if (!d.ok) expect(d.message).toMatch(/tuning set/);
		expect(d.ok).toBe(false);
	});
});
