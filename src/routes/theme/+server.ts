import { redirect } from '@sveltejs/kit';
import { parseTheme, safeReturnPath, THEME_COOKIE, THEME_MAX_AGE } from '$lib/theme';
import type { RequestHandler } from './$types';

/**
 * Remembers the colour theme chosen in the header (a plain form POST, so it works without
 * JavaScript) and goes back to the page it came from. Scripted callers that send
 * `x-theme-request: 1` get 204 instead of the redirect.
 */
export const POST: RequestHandler = async ({ request, cookies, url }) => {
	const form = await request.formData().catch(() => null);
	const theme = parseTheme(form?.get('theme')?.toString());
	cookies.set(THEME_COOKIE, theme, {
		path: '/',
		maxAge: THEME_MAX_AGE,
		sameSite: 'lax',
		httpOnly: true,
		secure: url.protocol === 'https:'
	});
	if (request.headers.get('x-theme-request') === '1') return new Response(null, { status: 204 });
	redirect(303, safeReturnPath(form?.get('returnTo')?.toString()));
};
