import { can } from '$lib/auth/roles';
import { actorOf } from '$lib/server/route-errors';
import { reviewQueueCounts } from '$lib/server/revisions';
import type { LayoutServerLoad } from './$types';

/**
 * The signed-in person for the navigation (hooks.server.ts already redirected anyone signed out).
 * Only what the pages show: id, name, role, whether the admin links appear, and for everyone who
 * reads drafts the review-queue counts (all waiting; what this person may review).
 */
export const load = (async ({ locals }) => {
	actorOf(locals.user);
	const u = locals.user!;
	const review = can(u.role, 'model.read_draft')
		? { ...(await reviewQueueCounts({ user: { id: u.id, email: u.email, name: u.name, role: u.role } })), isReviewer: can(u.role, 'revision.review') }
		: null;
	return {
		user: { id: u.id, name: u.name, role: u.role },
		isAdmin: can(u.role, 'user.manage'),
		review
	};
}) satisfies LayoutServerLoad;
