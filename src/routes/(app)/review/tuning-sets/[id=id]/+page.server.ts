import { fail } from '@sveltejs/kit';
import { can } from '$lib/auth/roles';
import { decide } from '$lib/workflow/state-machine';
import { approveSchema, discardSchema, fieldErrors, formValues, requestChangesSchema, submitSchema } from '$lib/schemas/revision';
import { approveTuningSet, discardTuningSet, getTuningSet, requestTuningChanges, submitTuningSet } from '$lib/server/tuning-sets';
import { actingFrom, reviewActionFailure } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import type { Actions, PageServerLoad } from './$types';

/**
 * One tuning set with the review actions the reader may take (submit, approve, send back,
 * discard), decided by the same state machine as model revisions; says why a reviewer may not
 * review it. Viewers see approved sets only (404 otherwise).
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const view = await orHttpError(getTuningSet(acting, Number(event.params.id)));
	const t = view.tuningSet;
	let why: string | null = null;
	if (t.state === 'in_review' && (can(acting.user.role, 'tuning.review') || acting.user.role === 'admin') && !view.allowed.approve) {
		const d = decide('approve', {
			subject: 'tuning_set',
			role: acting.user.role,
			actorId: acting.user.id,
			authorId: t.author.id,
			contributorIds: t.contributors.map((c) => c.id),
			state: t.state,
			modelStatus: view.model.status as 'draft' | 'active' | 'withdrawn',
			comment: 'x'
		});
		why = d.ok
			? t.onApprovedRevision
				? null
				: 'The model has a newer approved revision than the one this set was computed on: send it back so it is saved again against the current model.'
			: d.message;
	}
	return { tuningSet: t, model: view.model, allowed: view.allowed, why, canSeeQueue: can(acting.user.role, 'model.read_draft') };
}) satisfies PageServerLoad;

/** Review actions on this tuning set; each answers a success message or `fail` with the reason. */
export const actions = {
	/** Submit a draft tuning set for review (its author or a contributor). */
	submit: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = submitSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'submit', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const t = await submitTuningSet(acting, Number(event.params.id), { version: parsed.data.version });
			return { action: 'submit', ok: true as const, message: `Tuning set ${t.loopTag} is submitted for review; ${t.notified} reviewer(s) notified.` };
		} catch (e) {
			return reviewActionFailure(e, 'submit', values);
		}
	},
	/** Approve a tuning set in review (a reviewer who neither wrote nor edited it). */
	approve: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = approveSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'approve', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const t = await approveTuningSet(acting, Number(event.params.id), { comment: parsed.data.comment ?? null });
			return { action: 'approve', ok: true as const, message: `Tuning set ${t.loopTag} is approved; ${t.author.name} was notified.` };
		} catch (e) {
			return reviewActionFailure(e, 'approve', values);
		}
	},
	/** Send a tuning set back with a comment (compulsory). */
	requestChanges: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = requestChangesSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'requestChanges', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const t = await requestTuningChanges(acting, Number(event.params.id), { comment: parsed.data.comment });
			return { action: 'requestChanges', ok: true as const, message: `Tuning set ${t.loopTag} is sent back to ${t.author.name} with your comment.` };
		} catch (e) {
			return reviewActionFailure(e, 'requestChanges', values);
		}
	},
	/** Discard a draft or sent-back tuning set (its author or a contributor). */
	discard: async (event) => {
		const acting = actingFrom(event);
		const values = formValues(await event.request.formData());
		const parsed = discardSchema.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'discard', ok: false as const, errors: fieldErrors(parsed.error), values, conflict: false });
		try {
			const t = await discardTuningSet(acting, Number(event.params.id), { comment: parsed.data.comment ?? null });
			return { action: 'discard', ok: true as const, message: `Tuning set ${t.loopTag} is discarded.` };
		} catch (e) {
			return reviewActionFailure(e, 'discard', values);
		}
	}
} satisfies Actions;
