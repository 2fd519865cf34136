import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad, RequestEvent } from './$types';
import { clientAddressOf } from '../../../../auth';
import { recentAudit } from '$lib/server/audit';
import { actionFailure, isExpectedError, httpStatusOf } from '$lib/server/errors';
import { changeRole, createUser, issueOneTimePassword, listUsers, setActive, type Acting } from '$lib/server/users';
import { changeRoleSchema, createUserSchema, fieldErrors, formFields, userTargetSchema } from '$lib/schemas/users';

function acting(event: RequestEvent): Acting {
	if (!event.locals.user) error(401, 'Sign in first.');
	return { user: event.locals.user, ip: clientAddressOf(event) };
}

const ACTION_WORDS: Record<string, string> = {
	'user.create': 'added',
	'user.role_change': 'role changed',
	'user.deactivate': 'deactivated',
	'user.reactivate': 'reactivated',
	'user.password_reset': 'new one-time password',
	'user.password_change': 'changed own password',
	'user.profile_update': 'changed own name'
};

/** A short plain-words line for one audited change to a person (no secrets are ever in the log). */
function describeChange(action: string, before: unknown, after: unknown): string {
	const b = (before ?? {}) as Record<string, unknown>;
	const a = (after ?? {}) as Record<string, unknown>;
	const words = ACTION_WORDS[action] ?? action;
	if (action === 'user.role_change') return `${words}: ${String(b.role)} → ${String(a.role)}`;
	if (action === 'user.create') return `${words} as ${String(a.role)}`;
	return words;
}

export const load = (async (event) => {
	try {
		const users = await listUsers(acting(event));
		const names = new Map(users.map((u) => [String(u.id), u.name]));
		const changes = (await recentAudit(15, 'user.')).map((a) => ({
			id: a.id,
			at: a.at,
			actorEmail: a.actorEmail,
			action: a.action,
			subject: (a.entityId && names.get(a.entityId)) ?? `user #${a.entityId ?? '?'}`,
			detail: describeChange(a.action, a.before, a.after)
		}));
		return { users, changes, me: event.locals.user!.id };
	} catch (e) {
		if (isExpectedError(e)) error(httpStatusOf(e), e.message);
		throw e;
	}
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { email: fields.email ?? '', name: fields.name ?? '', role: fields.role ?? '' };
		const parsed = createUserSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'create' });
		try {
			const { user, oneTimePassword } = await createUser(acting(event), parsed.data);
			return { action: 'create', issued: { userId: user.id, email: user.email, name: user.name, oneTimePassword } };
		} catch (e) {
			return actionFailure(e, values, 'create');
		}
	},
	role: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { userId: fields.userId ?? '', role: fields.role ?? '' };
		const parsed = changeRoleSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'role' });
		try {
			const user = await changeRole(acting(event), parsed.data.userId, parsed.data.role);
			return { action: 'role', done: `${user.name} is now ${user.role}.` };
		} catch (e) {
			return actionFailure(e, values, 'role');
		}
	},
	deactivate: async (event) => toggle(event, false),
	reactivate: async (event) => toggle(event, true),
	reset: async (event) => {
		const fields = formFields(await event.request.formData());
		const values = { userId: fields.userId ?? '' };
		const parsed = userTargetSchema.safeParse(fields);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action: 'reset' });
		try {
			const { user, oneTimePassword } = await issueOneTimePassword(acting(event), parsed.data.userId);
			return { action: 'reset', issued: { userId: user.id, email: user.email, name: user.name, oneTimePassword } };
		} catch (e) {
			return actionFailure(e, values, 'reset');
		}
	}
} satisfies Actions;

async function toggle(event: RequestEvent, active: boolean) {
	const fields = formFields(await event.request.formData());
	const values = { userId: fields.userId ?? '' };
	const action = active ? 'reactivate' : 'deactivate';
	const parsed = userTargetSchema.safeParse(fields);
	if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values, action });
	try {
		const user = await setActive(acting(event), parsed.data.userId, active);
		return { action, done: active ? `${user.name} can sign in again.` : `${user.name} is deactivated and signed out.` };
	} catch (e) {
		return actionFailure(e, values, action);
	}
}
