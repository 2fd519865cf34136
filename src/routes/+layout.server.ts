import { parseTheme, THEME_COOKIE } from '$lib/theme';
import type { LayoutServerLoad } from './$types';

/** The person's colour theme from its cookie, so the first paint already has it. */
export const load = (({ cookies }) => {
	return { theme: parseTheme(cookies.get(THEME_COOKIE)) };
}) satisfies LayoutServerLoad;
