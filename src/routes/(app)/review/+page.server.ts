import { queryErrors, queryValues, reviewQueueQuerySchema } from '$lib/schemas/review';
import { reviewQueuePage } from '$lib/server/review-queue';
import { actingFrom } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import { can } from '$lib/auth/roles';
import type { PageServerLoad } from './$types';

/**
 * The review queue: model revisions and tuning sets waiting for review, oldest first, with their
 * author, waiting time, change size and whether the reader may review them (and why not).
 * Engineers, reviewers and administrators; viewers get 403 from the service. Filters come from the
 * query string (a GET form, so the page works without JavaScript).
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const values = queryValues(event.url.searchParams);
	const parsed = reviewQueueQuerySchema.safeParse(values);
	const q = parsed.success ? parsed.data : {};
	const page = await orHttpError(
		reviewQueuePage(acting, {
			siteId: q.site,
			structure: q.structure,
			authorId: q.author,
			kind: q.kind,
			minWaitingDays: q.age,
			reviewableOnly: q.mine === '1'
		})
	);
	return {
		...page,
		query: values,
		errors: parsed.success ? {} : queryErrors(parsed.error),
		isReviewer: can(acting.user.role, 'revision.review')
	};
}) satisfies PageServerLoad;
