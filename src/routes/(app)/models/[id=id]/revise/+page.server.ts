import { error, fail, redirect } from '@sveltejs/kit';
import { can } from '$lib/auth/roles';
import { fieldErrors, formValues, revisionEditSchema, revisionSchema } from '$lib/schemas/revision';
import { actionFailure, isExpectedError } from '$lib/server/errors';
import { actingOf } from '$lib/server/api-responses';
import { ConflictError, createRevision, getHistory, getRevision, revisionTemplate, updateDraft, type Acting } from '$lib/server/revisions';
import { orHttpError } from '$lib/server/route-errors';
import { submittedValues, toFormStrings, type ConflictView, type FormStrings } from '$lib/components/model-form/form-values';
import type { RevisionInput } from '$lib/schemas/revision';
import type { Actions, PageServerLoad } from './$types';

const OPEN = new Set(['draft', 'changes_requested', 'in_review']);
const REFUSED = 'Only engineers and reviewers can propose revisions.';

async function openRevisionOf(acting: Acting, modelId: number) {
	const history = await getHistory(acting, modelId);
	return { model: history.model, open: history.revisions.find((r) => OPEN.has(r.state)) ?? null };
}

/**
 * One address for changing a model: `/models/:id/revise`. When the model has a revision being
 * worked on (a draft, or one sent back), the form edits it, guarded by its version (optimistic
 * locking); otherwise the form starts a new draft revision from the approved one. A revision in
 * review cannot be edited: the page says so (mode "blocked").
 */
export const load = (async (event) => {
	const acting = actingOf(event);
	if (!acting) error(401, 'Sign in to change a model.');
	if (!can(acting.user.role, 'revision.propose')) error(403, REFUSED);
	const modelId = Number(event.params.id);
	const { model, open } = await orHttpError(openRevisionOf(acting, modelId));
	if (open) {
		const view = await orHttpError(getRevision(acting, open.id));
		if (view.allowed.edit) {
			return {
				model,
				mode: 'edit' as const,
				revision: { id: view.revision.id, no: view.revision.no, state: view.revision.state, authorName: view.revision.author.name },
				version: view.revision.version,
				initial: toFormStrings(view.formValues),
				blocked: null
			};
		}
		const why =
			open.state === 'in_review'
				? `Revision ${open.no} is in review. It can be changed again once a reviewer sends it back, or after it is approved (as a new revision).`
				: `Revision ${open.no} (${open.state.replace('_', ' ')}) is open and you may not edit it.`;
		return { model, mode: 'blocked' as const, revision: { id: open.id, no: open.no, state: open.state, authorName: open.author.name }, version: null, initial: {}, blocked: why };
	}
	try {
		const template = await revisionTemplate(acting, modelId);
		return { model, mode: 'revise' as const, revision: null, version: null, initial: toFormStrings(template.values), blocked: null };
	} catch (e) {
		if (!isExpectedError(e) || ('status' in e && e.status === 404)) throw e;
		return { model, mode: 'blocked' as const, revision: null, version: null, initial: {}, blocked: e.message };
	}
}) satisfies PageServerLoad;

function conflictView(e: ConflictError<RevisionInput>): ConflictView {
	return {
		message: e.message,
		version: e.current.version,
		updatedBy: e.current.updatedBy?.name ?? null,
		updatedAt: e.current.updatedAt,
		stored: toFormStrings(e.current.values)
	};
}

/** `save` writes through the revision services; `refresh` re-renders the form without JavaScript. */
export const actions = {
	/**
	 * Edit the open draft (when the form carries its `version`) or start a new revision; checked with
	 * the shared schema, saved through the services (transaction + audit). A draft saved by someone
	 * else in between answers 409 with both versions; nothing is written and the form keeps its values.
	 */
	save: async (event) => {
		const acting = actingOf(event);
		if (!acting) error(401, 'Sign in to change a model.');
		const modelId = Number(event.params.id);
		const values: FormStrings = formValues(await event.request.formData());
		// Permission before validation: a viewer learns nothing about the form's rules.
		if (!can(acting.user.role, 'revision.propose')) return fail(403, { errors: { _form: REFUSED }, values, conflict: null });
		const editing = (values.version ?? '') !== '';
		const mode = editing ? 'edit' : 'revise';
		const submitted = submittedValues(mode, values);
		const parsed = editing ? revisionEditSchema().safeParse(submitted) : revisionSchema().safeParse(submitted);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, conflict: null });
		try {
			if ('version' in parsed.data) {
				// The revision edited is the model's open one, found here — never an id from the form.
				const { open } = await openRevisionOf(acting, modelId);
				if (!open) return fail(409, { errors: { _form: 'This model has no open draft any more (it was submitted, approved or discarded meanwhile). Reload the page.' }, values, conflict: null });
				await updateDraft(acting, open.id, parsed.data.version, parsed.data.revision);
			} else {
				await createRevision(acting, modelId, parsed.data);
			}
		} catch (e) {
			if (e instanceof ConflictError) {
				return fail(409, { errors: { _form: e.message }, values, conflict: conflictView(e as ConflictError<RevisionInput>) });
			}
			return actionFailure(e, { ...values });
		}
		redirect(303, `/models/${modelId}`);
	},
	/** Without JavaScript: re-render the form for another structure, keeping every value; saves nothing. */
	refresh: async ({ request, locals }) => {
		const values = formValues(await request.formData());
		if (!locals.user || !can(locals.user.role, 'revision.propose')) return fail(403, { errors: { _form: REFUSED }, values, conflict: null });
		return { values, errors: {} as Record<string, string>, conflict: null };
	}
} satisfies Actions;
