import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { listCaughtMail } from '$lib/server/mail/catcher';
import { listOutbox, retryFailedMail } from '$lib/server/mail/worker';
import { env } from '$lib/server/env';
import { actingFrom, reviewActionFailure } from '$lib/server/review-actions';
import { orHttpError } from '$lib/server/route-errors';
import { queryValues } from '$lib/schemas/review';
import type { Actions, PageServerLoad } from './$types';

/** Caught messages a page. */
const PAGE_SIZE = 50;

const listQuery = z.object({
	q: z.preprocess((v) => (typeof v === 'string' ? v.trim() : v), z.string().max(200, 'Search has at most 200 characters.').optional()),
	page: z.preprocess((v) => (v === '' ? undefined : v), z.string().regex(/^[1-9]\d{0,5}$/, 'Page: a whole number from 1.').transform(Number).optional())
});
const retryForm = z.object({ id: z.string().regex(/^[1-9]\d{0,17}$/, 'Message: choose one from the outbox list.').transform(Number) });

/**
 * Administrators' mail page: what the local mail catcher received (newest first, searchable by
 * subject or address), and the newest rows of the outbox with their delivery state. With SMTP_URL
 * set mail goes to a real relay and the catcher is off; the page says so.
 */
export const load = (async (event) => {
	const acting = actingFrom(event);
	const parsed = listQuery.safeParse(queryValues(event.url.searchParams));
	const q = parsed.success ? (parsed.data.q ?? '') : '';
	const page = parsed.success ? (parsed.data.page ?? 1) : 1;
	const [caught, outbox] = await Promise.all([
		orHttpError(listCaughtMail(acting, { q, limit: PAGE_SIZE, offset: (page - 1) * PAGE_SIZE })),
		orHttpError(listOutbox(acting, { limit: 20 }))
	]);
	return {
		caught,
		page,
		pageCount: Math.max(1, Math.ceil(caught.total / PAGE_SIZE)),
		q,
		queryError: parsed.success ? null : (parsed.error.issues[0]?.message ?? 'Search: not valid.'),
		outbox,
		relay: Boolean(env().SMTP_URL)
	};
}) satisfies PageServerLoad;

/** Outbox administration from the mail page. */
export const actions = {
	/** Put a failed outbox message back in the queue, due now (audited by the service). */
	retry: async (event) => {
		const acting = actingFrom(event);
		const values = Object.fromEntries([...(await event.request.formData()).entries()].filter(([, v]) => typeof v === 'string')) as Record<string, string>;
		const parsed = retryForm.safeParse(values);
		if (!parsed.success) return fail(400, { action: 'retry', ok: false as const, errors: { _form: parsed.error.issues[0].message }, values, conflict: false });
		try {
			await retryFailedMail(acting, parsed.data.id);
			return { action: 'retry', ok: true as const, message: `Message ${parsed.data.id} is queued again; the mail worker sends it on its next round.` };
		} catch (e) {
			return reviewActionFailure(e, 'retry', values);
		}
	}
} satisfies Actions;
