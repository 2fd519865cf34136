import { error, fail, redirect } from '@sveltejs/kit';
import { can } from '$lib/auth/roles';
import { actionFailure } from '$lib/server/errors';
import { actingOf } from '$lib/server/api-responses';
import { assetPickerOptions } from '$lib/server/asset-options';
import { createModel } from '$lib/server/revisions';
import { orHttpError } from '$lib/server/route-errors';
import { NEW_MODEL_DEFAULTS, submittedValues } from '$lib/components/model-form/form-values';
import { fieldErrors, formValues, modelCreateSchema } from '$lib/schemas/revision';
import type { Actions, PageServerLoad } from './$types';

const REFUSED = 'Only engineers and reviewers can record new models.';

/**
 * A new plant model with its first draft revision (engineers and reviewers). The asset is one of
 * the register's (`?asset=<id>` pre-selects it) or a new one described in the form.
 */
export const load = (async ({ locals, url }) => {
	const user = locals.user;
	if (!user) error(401, 'Sign in to record a model.');
	if (!can(user.role, 'model.create')) error(403, REFUSED);
	const options = await orHttpError(assetPickerOptions({ id: user.id, role: user.role }));
	const asked = Number(url.searchParams.get('asset'));
	const preset = Number.isInteger(asked) && options.assets.some((a) => a.id === asked) ? String(asked) : '';
	return { options, initial: { ...NEW_MODEL_DEFAULTS, assetId: preset } };
}) satisfies PageServerLoad;

/** `save` writes through `createModel`; `refresh` re-renders the form without JavaScript. */
export const actions = {
	/** Check with the shared schema; save through the service (one transaction with its audit event); go to the new model. */
	save: async (event) => {
		const acting = actingOf(event);
		if (!acting) error(401, 'Sign in to record a model.');
		const values = formValues(await event.request.formData());
		// Permission before validation: a viewer learns nothing about the form's rules.
		if (!can(acting.user.role, 'model.create')) return fail(403, { errors: { _form: REFUSED }, values });
		const parsed = modelCreateSchema().safeParse(submittedValues('create', values));
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values });
		let modelId: number;
		try {
			const { model } = await createModel(acting, parsed.data);
			modelId = model.id;
		} catch (e) {
			return actionFailure(e, values);
		}
		redirect(303, `/models/${modelId}`);
	},
	/** Without JavaScript: re-render the form for another structure, keeping every value; saves nothing. */
	refresh: async ({ request, locals }) => {
		const values = formValues(await request.formData());
		if (!locals.user || !can(locals.user.role, 'model.create')) return fail(403, { errors: { _form: REFUSED }, values });
		return { values, errors: {} as Record<string, string> };
	}
} satisfies Actions;
