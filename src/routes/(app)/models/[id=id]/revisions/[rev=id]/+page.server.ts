import { error, fail } from '@sveltejs/kit';
import { can } from '$lib/auth/roles';
import { decide, type Transition } from '$lib/workflow/state-machine';
import {
	approveSchema,
	discardSchema,
	fieldErrors,
	formValues,
	requestChangesSchema,
	revalidateSchema,
	submitSchema,
	withdrawSchema
} from '$lib/schemas/revision';
import {
	approve,
	diffRevisions,
	discardRevision,
	getRevision,
	requestChanges,
	revalidate,
	submitForReview,
	withdrawModel
} from '$lib/server/revisions';
import { actingFrom, assertRevisionOfModel, reviewActionFailure } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import { todayUtc } from '$lib/format';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

/**
 * One revision of a model with the review actions the reader may take on it (from the state
 * machine, the rule the services apply): submit, approve, send back, discard, and for the model
 * withdraw and revalidate. Actions not allowed are not offered; when a reviewer may not review
 * this one, the page says why (four-eyes, administrators never approve).
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const modelId = Number(event.params.id);
	const view = await orHttpError(getRevision(acting, Number(event.params.rev)));
	if (view.model.id !== modelId) error(404, 'This model has no such revision.');
	const r = view.revision;
	const approvedId = view.model.approvedRevisionId;
	const comparison = approvedId !== null && approvedId !== r.id ? await orHttpError(diffRevisions(acting, approvedId, r.id)) : null;

	// Why a reviewer-side action is not offered, in the state machine's own words (only where the
	// reader could otherwise expect it: a revision in review, read by a reviewer or an administrator).
	const why: Partial<Record<Transition, string>> = {};
	if (r.state === 'in_review' && (can(acting.user.role, 'revision.review') || acting.user.role === 'admin') && !view.allowed.approve) {
		const d = decide('approve', {
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: r.author.id,
			contributorIds: r.contributors.map((c) => c.id),
			state: r.state,
			modelStatus: view.model.status,
			comment: 'x'
		});
		if (!d.ok) why.approve = d.message;
	}
	return {
		model: view.model,
		revision: r,
		allowed: view.allowed,
		largeChanges: view.largeChanges.map((l) => l.message),
		comparison: comparison && { from: comparison.from, to: comparison.to, parameters: comparison.parameters },
		why,
		canEditLink: view.allowed.edit,
		today: todayUtc(),
		canSeeQueue: can(acting.user.role, 'model.read_draft')
	};
}) satisfies PageServerLoad;

async function target(event: RequestEvent): Promise<{ modelId: number; revisionId: number }> {
	const modelId = Number(event.params.id);
	const revisionId = Number(event.params.rev);
	await assertRevisionOfModel(revisionId, modelId);
	return { modelId, revisionId };
}

/** Review actions on this revision (and its model); each answers a success message or `fail` with the reason. */
export const actions = {
	/** Submit a draft for review (its author or a contributor); reviewers are notified by mail. */
	submit: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = submitSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'submit', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { revisionId } = await target(event);
			const r = await submitForReview(acting, revisionId, { version: parsed.data.version });
			return {
				action: 'submit',
				ok: true as const,
				message: `Revision ${r.revision.no} is submitted for review. ${r.notified === 1 ? 'One reviewer was' : `${r.notified} reviewers were`} notified by e-mail.`
			};
		} catch (e) {
			return reviewActionFailure(e, 'submit', values);
		}
	},
	/** Approve a revision in review (a reviewer who neither wrote nor edited it); a large change needs a comment. */
	approve: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = approveSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'approve', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { revisionId } = await target(event);
			const r = await approve(acting, revisionId, { comment: parsed.data.comment ?? null });
			return {
				action: 'approve',
				ok: true as const,
				message: `Revision ${r.revision.no} is approved. It is now the reference for ${r.model.asset.tag}; readers see it and ${r.revision.author.name} was notified.`
			};
		} catch (e) {
			return reviewActionFailure(e, 'approve', values);
		}
	},
	/** Send a revision in review back to its author with a comment (compulsory). */
	requestChanges: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = requestChangesSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'requestChanges', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { revisionId } = await target(event);
			const r = await requestChanges(acting, revisionId, { comment: parsed.data.comment });
			return {
				action: 'requestChanges',
				ok: true as const,
				message: `Revision ${r.revision.no} is sent back to ${r.revision.author.name} with your comment; they were notified.`
			};
		} catch (e) {
			return reviewActionFailure(e, 'requestChanges', values);
		}
	},
	/** Discard an open revision (draft or sent back) its author or a contributor no longer wants. */
	discard: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = discardSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'discard', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { revisionId } = await target(event);
			const r = await discardRevision(acting, revisionId, { comment: parsed.data.comment ?? null });
			return {
				action: 'discard',
				ok: true as const,
				message:
					r.model.status === 'withdrawn'
						? `Revision ${r.revision.no} is discarded. It was the model's only revision, so the model is withdrawn.`
						: `Revision ${r.revision.no} is discarded; the approved revision stays the reference.`
			};
		} catch (e) {
			return reviewActionFailure(e, 'discard', values);
		}
	},
	/** Withdraw (retire) the whole model with a reason (reviewers and administrators). */
	withdraw: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = withdrawSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'withdraw', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { modelId } = await target(event);
			const m = await withdrawModel(acting, modelId, { reason: parsed.data.reason });
			return { action: 'withdraw', ok: true as const, message: `${m.asset.tag} · ${m.title} is withdrawn. It stays in the register for the record and no longer changes.` };
		} catch (e) {
			return reviewActionFailure(e, 'withdraw', values);
		}
	},
	/** Re-approve the unchanged model with a new revalidate-by date (a reviewer who did not write it). */
	revalidate: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = revalidateSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'revalidate', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const { modelId } = await target(event);
			const r = await revalidate(acting, modelId, { revalidateBy: parsed.data.revalidateBy, comment: parsed.data.comment ?? null });
			return {
				action: 'revalidate',
				ok: true as const,
				message: `Revalidated: revision ${r.revision.no} records the unchanged model with revalidate-by ${r.revision.provenance.revalidateBy}.`,
				newRevisionId: r.revision.id
			};
		} catch (e) {
			return reviewActionFailure(e, 'revalidate', values);
		}
	}
} satisfies Actions;
