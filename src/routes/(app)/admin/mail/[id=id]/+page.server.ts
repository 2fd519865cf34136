import { getCaughtMail } from '$lib/server/mail/catcher';
import { actingFrom } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/**
 * One caught message: headers, the plain-text body, and the HTML body sanitised on the server
 * (text formatting, tables and links only — no scripts, styles or images), with the HTML as
 * received shown as text. Administrators only.
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	return { message: await orHttpError(getCaughtMail(acting, Number(event.params.id))) };
}) satisfies PageServerLoad;
