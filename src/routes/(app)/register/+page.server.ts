import { can } from '$lib/auth/roles';
import { parseRegisterQuery } from '$lib/schemas/register';
import { listRegister } from '$lib/server/register';
import { hierarchyOptions } from '$lib/server/sites';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/**
 * The register list. Everything comes from the URL (filters, sort, page), so links are shareable
 * and the back button works. A parameter that cannot be used is dropped and named in `issues`
 * (the page says so) instead of failing the whole list.
 */
export const load = (async ({ url, locals }) => {
	const actor = actorOf(locals.user);
	const { query, issues } = parseRegisterQuery(url.searchParams);
	const options = await orHttpError(hierarchyOptions(actor));
	if (query.area) {
		const area = options.areas.find((a) => a.id === query.area);
		if (!area) {
			issues.push({ field: 'area', message: 'area is not a known area' });
			delete query.area;
		} else if (query.site && area.siteId !== query.site) {
			issues.push({ field: 'area', message: 'area is not in the chosen site' });
			delete query.area;
		}
	}
	if (query.site && !options.sites.some((s) => s.id === query.site)) {
		issues.push({ field: 'site', message: 'site is not a known site' });
		delete query.site;
	}
	const page = await orHttpError(listRegister(actor, query));
	return {
		query,
		issues,
		page,
		options,
		canSeeDrafts: can(actor.role, 'model.read_draft')
	};
}) satisfies PageServerLoad;
