import { redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { clientAddressOf, signOutSession } from '../../../auth';
import { recordSignOut } from '$lib/server/auth';

export const load = (async ({ locals }) => {
	if (!locals.user) redirect(303, '/signin');
	return { name: locals.user.name };
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const user = event.locals.user;
		await signOutSession(event);
		if (user) await recordSignOut(user, clientAddressOf(event));
		redirect(303, '/signin?signedOut=1');
	}
} satisfies Actions;
