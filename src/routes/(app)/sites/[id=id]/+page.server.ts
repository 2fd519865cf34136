import { todayUtc } from '$lib/format';
import { getSite } from '$lib/server/sites';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/** One site with its areas and their counts. */
export const load = (async ({ params, locals }) => {
	const actor = actorOf(locals.user);
	return { site: await orHttpError(getSite(actor, Number(params.id), todayUtc())) };
}) satisfies PageServerLoad;
