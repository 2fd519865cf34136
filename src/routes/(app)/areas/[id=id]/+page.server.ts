import { todayUtc } from '$lib/format';
import { getArea } from '$lib/server/sites';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/** One area with its assets and their model counts. */
export const load = (async ({ params, locals }) => {
	const actor = actorOf(locals.user);
	return { area: await orHttpError(getArea(actor, Number(params.id), todayUtc())) };
}) satisfies PageServerLoad;
