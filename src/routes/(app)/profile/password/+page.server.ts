import { error, fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { clientAddressOf } from '../../../../auth';
import { actionFailure } from '$lib/server/errors';
import { changeOwnPassword } from '$lib/server/users';
import { fieldErrors, formFields, passwordChangeSchema } from '$lib/schemas/users';

export const load = (async ({ locals }) => {
	if (!locals.user) error(401, 'Sign in first.');
	return { mustChange: locals.user.mustChangePassword, email: locals.user.email };
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const user = event.locals.user;
		if (!user) error(401, 'Sign in first.');
		const fields = formFields(await event.request.formData());
		const parsed = passwordChangeSchema.safeParse(fields);
		// Passwords are never sent back to the form.
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error) });
		try {
			await changeOwnPassword({ user, ip: clientAddressOf(event) }, parsed.data.current, parsed.data.next);
		} catch (e) {
			return actionFailure(e, {});
		}
		redirect(303, user.mustChangePassword ? '/register' : '/profile?passwordChanged=1');
	}
} satisfies Actions;
