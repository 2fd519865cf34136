import { todayUtc } from '$lib/format';
import { listSites } from '$lib/server/sites';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/** Every site with its counts. */
export const load = (async ({ locals }) => {
	const actor = actorOf(locals.user);
	return { sites: await orHttpError(listSites(actor, todayUtc())) };
}) satisfies PageServerLoad;
