import { redirect } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';

/** The register is the home page. */
export const load = (() => {
	redirect(307, '/register');
}) satisfies PageServerLoad;
