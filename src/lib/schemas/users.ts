/**
 * Input schemas for sign-in, the users admin page and the profile page. Shared by the form
 * actions and any API route, so the same field gets the same message everywhere.
 */
import { z } from 'zod';
import { ROLES } from '../auth/roles';

/** Shortest password we accept, in characters (NIST SP 800-63B §5.1.1.2 asks for at least 8; we ask 12). */
export const PASSWORD_MIN_LENGTH = 12;
/** bcrypt reads only the first 72 bytes of a password (Provos & Mazières, 1999), so longer ones are refused. */
export const PASSWORD_MAX_BYTES = 72;

const email = z
	.string({ error: 'Enter an email address.' })
	.trim()
	.toLowerCase()
	.min(1, 'Enter an email address.')
	.max(254, 'An email address has at most 254 characters.')
	.pipe(z.email({ error: 'Enter a valid email address, like name@example.com.' }));

const personName = z
	.string({ error: 'Enter a name.' })
	.trim()
	.min(1, 'Enter a name.')
	.max(120, 'A name has at most 120 characters.')
	.refine((s) => !/[\u0000-\u001f\u007f]/.test(s), 'A name cannot contain control characters.');

const role = z.enum(ROLES, { error: 'Choose one of: viewer, engineer, reviewer, admin.' });

/** A new password: 12+ characters, at most 72 bytes, not only spaces. */
export const newPassword = z
	.string({ error: 'Enter a new password.' })
	.min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters.`)
	.refine((s) => new TextEncoder().encode(s).length <= PASSWORD_MAX_BYTES, `Use at most ${PASSWORD_MAX_BYTES} bytes (about 70 plain letters).`)
	.refine((s) => s.trim().length > 0, 'A password cannot be only spaces.');

/**
 * A same-origin path to return to after signing in: must start with a single "/", no scheme,
 * no "//" or "/\" (protocol-relative), no control characters. Anything else becomes null.
 */
export function safeRedirectPath(value: unknown): string | null {
	if (typeof value !== 'string' || value.length === 0 || value.length > 2000) return null;
	if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null;
	if (/[\u0000-\u001f\u007f\\]/.test(value)) return null;
	try {
		const resolved = new URL(value, 'http://loopledger.invalid');
		if (resolved.origin !== 'http://loopledger.invalid') return null;
		if (resolved.pathname.startsWith('/auth/') || resolved.pathname === '/signout') return null;
		return resolved.pathname + resolved.search + resolved.hash;
	} catch {
		return null;
	}
}

/** The sign-in form. The password is not trimmed (spaces may be part of it). */
export const signInSchema = z.object({
	email,
	password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(1000, 'Enter your password.'),
	redirectTo: z
		.string()
		.optional()
		.transform((v) => safeRedirectPath(v))
});
export type SignInInput = z.infer<typeof signInSchema>;

/** Admin: create a user (the password is generated, never typed). */
export const createUserSchema = z.object({ email, name: personName, role });
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** A user id from a form field: a positive integer. */
export const userIdSchema = z.coerce
	.number({ error: 'A user id is a positive whole number.' })
	.int('A user id is a positive whole number.')
	.positive('A user id is a positive whole number.')
	.max(4294967295, 'A user id is a positive whole number.');

/** Admin: change a role. */
export const changeRoleSchema = z.object({ userId: userIdSchema, role });

/** Admin: deactivate, reactivate or issue a new one-time password. */
export const userTargetSchema = z.object({ userId: userIdSchema });

/** Profile: own display name. */
export const profileSchema = z.object({ name: personName });

/** Profile: change own password. */
export const passwordChangeSchema = z
	.object({
		current: z.string({ error: 'Enter your current password.' }).min(1, 'Enter your current password.').max(1000),
		next: newPassword,
		confirm: z.string({ error: 'Type the new password again.' })
	})
	.superRefine((v, ctx) => {
		if (v.confirm !== v.next) ctx.addIssue({ code: 'custom', path: ['confirm'], message: 'The two new passwords differ.' });
		if (v.next === v.current) ctx.addIssue({ code: 'custom', path: ['next'], message: 'Choose a password different from the current one.' });
	});

/** Validity choices for a new API token, in days; "never" has no expiry. */
export const TOKEN_LIFETIMES = ['30', '90', '365', 'never'] as const;

/** Profile: create an API token. */
export const apiTokenCreateSchema = z.object({
	name: z
		.string({ error: 'Name the token after the script that will use it.' })
		.trim()
		.min(1, 'Name the token after the script that will use it.')
		.max(80, 'A token name has at most 80 characters.'),
	lifetime: z.enum(TOKEN_LIFETIMES, { error: 'Choose 30, 90 or 365 days, or no expiry.' }).default('90')
});

/** Profile: revoke an API token. */
export const apiTokenRevokeSchema = z.object({
	tokenId: z.coerce.number({ error: 'A token id is a positive whole number.' }).int().positive().max(4294967295)
});

/** Field → first message, for `fail(400, { errors })`. Form-level problems go under `_form`. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? String(issue.path[0]) : '_form';
		if (!(key in out)) out[key] = issue.message;
	}
	return out;
}

/** The string fields of a FormData as a plain object (files and repeated keys ignored). */
export function formFields(data: FormData): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of data.entries()) if (typeof v === 'string' && !(k in out)) out[k] = v;
	return out;
}
