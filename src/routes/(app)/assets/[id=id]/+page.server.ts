import { getAssetPage } from '$lib/server/assets';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/** An asset: its facts, its models (withdrawn ones apart) and the tuning sets of those models. */
export const load = (async ({ params, locals }) => {
	const actor = actorOf(locals.user);
	return { asset: await orHttpError(getAssetPage(actor, Number(params.id))) };
}) satisfies PageServerLoad;
