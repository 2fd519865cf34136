import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad, RequestEvent } from './$types';
import { clientAddressOf } from '../../../auth';
import { actionFailure, httpStatusOf, isExpectedError } from '$lib/server/errors';
import { createApiToken, listApiTokens, revokeApiToken } from '$lib/server/tokens';
import { ownAccount, updateOwnName, type Acting } from '$lib/server/users';
import { apiTokenCreateSchema, apiTokenRevokeSchema, fieldErrors, formFields, profileSchema } from '$lib/schemas/users';

function acting(event: RequestEvent): Acting {
	if (!event.locals.user) error(401, 'Sign in first.');
	return { user: event.locals.user, ip: clientAddressOf(event) };
}

export const load = (async (event) => {
	try {
		const a = acting(event);
		const [account, tokens] = await Promise.all([ownAccount(a), listApiTokens(a.user)]);
		return { account, tokens, passwordChanged: event.url.searchParams.get('passwordChanged') === '1' };
	} catch (e) {
		if (isExpectedError(e)) error(httpStatusOf(e), e.message);
		throw e;
	}
}) satisfies PageServerLoad;

export const actions = {
	name: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { name: fields.name ?? '' };
		const parsed = profileSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'name' });
		try {
			await updateOwnName(acting(event), parsed.data.name);
			return { action: 'name', done: 'Your name is saved.' };
		} catch (e) {
			return actionFailure(e, values, 'name');
		}
	},
	createToken: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { name: fields.name ?? '', lifetime: fields.lifetime ?? '' };
		const parsed = apiTokenCreateSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'createToken' });
		try {
			const a = acting(event);
			const days = parsed.data.lifetime === 'never' ? null : Number(parsed.data.lifetime);
			const { token, dto } = await createApiToken(a.user, { name: parsed.data.name, lifetimeDays: days }, a.ip ?? null);
			return { action: 'createToken', created: { name: dto.name, token } };
		} catch (e) {
			return actionFailure(e, values, 'createToken');
		}
	},
	revokeToken: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { tokenId: fields.tokenId ?? '' };
		const parsed = apiTokenRevokeSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'revokeToken' });
		try {
			const a = acting(event);
			const dto = await revokeApiToken(a.user, parsed.data.tokenId, a.ip ?? null);
			return { action: 'revokeToken', done: `Token “${dto.name}” is revoked.` };
		} catch (e) {
			return actionFailure(e, values, 'revokeToken');
		}
	}
} satisfies Actions;
