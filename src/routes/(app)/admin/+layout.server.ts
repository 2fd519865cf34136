import { error } from '@sveltejs/kit';
import type { LayoutServerLoad } from './$types';
import { can } from '$lib/auth/roles';

// hooks.server.ts already refuses data requests and form posts here; this renders the 403 page.
export const load = (async ({ locals }) => {
	if (!locals.user || !can(locals.user.role, 'user.manage')) error(403, 'Only administrators can manage users.');
	return {};
}) satisfies LayoutServerLoad;
