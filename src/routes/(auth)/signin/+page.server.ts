import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { signInWithPassword } from '../../../auth';
import { env } from '$lib/server/env';
import { DEMO_USERS } from '$lib/server/seed/demo-users';
import { ROLE_LABELS } from '$lib/auth/roles';
import { fieldErrors, formFields, safeRedirectPath, signInSchema } from '$lib/schemas/users';

export const load = (async ({ locals, url }) => {
	const redirectTo = safeRedirectPath(url.searchParams.get('redirectTo'));
	if (locals.user) redirect(303, redirectTo ?? '/register');
	const demo = env().DEMO;
	return {
		redirectTo,
		signedOut: url.searchParams.get('signedOut') === '1',
		demoUsers: demo
			? DEMO_USERS.map((u) => ({ email: u.email, name: u.name, roleLabel: ROLE_LABELS[u.role], duty: u.duty, password: u.password }))
			: []
	};
}) satisfies PageServerLoad;

function lockedMessage(retryAt: Date, now = new Date()): string {
	const minutes = Math.max(1, Math.ceil((retryAt.getTime() - now.getTime()) / 60_000));
	const at = retryAt.toISOString().slice(11, 16);
	return `Too many failed attempts for this account. Try again in ${minutes} minute${minutes === 1 ? '' : 's'} (after ${at} UTC).`;
}

export const actions = {
	default: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { email: fields.email ?? '', redirectTo: safeRedirectPath(fields.redirectTo) ?? '' };
		const parsed = signInSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values });
		const result = await signInWithPassword(event, parsed.data.email, parsed.data.password);
		if (result.ok) redirect(303, parsed.data.redirectTo ?? '/register');
		if (result.reason === 'locked') return fail(429, { errors: { _form: lockedMessage(result.retryAt) }, values });
		if (result.reason === 'inactive') {
			return fail(403, { errors: { _form: 'This account is deactivated. Ask an administrator to reactivate it.' }, values });
		}
		return fail(400, { errors: { _form: 'Email or password is not right.' }, values });
	}
} satisfies Actions;
