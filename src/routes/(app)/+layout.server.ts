import { can } from '$lib/auth/roles';
import { actorOf } from '$lib/server/route-errors';
import type { LayoutServerLoad } from './$types';

/**
 * The signed-in person for the navigation (hooks.server.ts already redirected anyone signed out).
 * Only what the pages show: id, name, role and whether the admin link appears.
 */
export const load = (({ locals }) => {
	actorOf(locals.user);
	const u = locals.user!;
	return {
		user: { id: u.id, name: u.name, role: u.role },
		isAdmin: can(u.role, 'user.manage')
	};
}) satisfies LayoutServerLoad;
