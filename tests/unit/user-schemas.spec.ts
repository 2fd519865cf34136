/**
 * Input schemas of sign-in, users admin and profile. Limits: bcrypt reads only 72 bytes of a
 * password (Provos & Mazières, "A Future-Adaptable Password Scheme", USENIX 1999); email length
 * 254 (RFC 5321 §4.5.3.1 path limit, as commonly applied — common practice).
 */
import { describe, expect, it } from 'vitest';
import {
	apiTokenCreateSchema,
	apiTokenRevokeSchema,
	changeRoleSchema,
	createUserSchema,
	fieldErrors,
	formFields,
	passwordChangeSchema,
	profileSchema,
	safeRedirectPath,
	signInSchema,
	userTargetSchema
} from '../../src/lib/schemas/users';

function errorsOf(result: { success: boolean; error?: unknown }): Record<string, string> {
	expect(result.success).toBe(false);
	return fieldErrors(result.error as never);
}

describe('signInSchema', () => {
	it('lower-cases and trims the email, keeps the password as typed', () => {
		const r = signInSchema.parse({ email: '  Priya@Brackwater.Example ', password: ' pass word ' });
		expect(r.email).toBe('priya@brackwater.example');
		expect(r.password).toBe(' pass word ');
		expect(r.redirectTo).toBeNull();
	});
	it('names the field when something is missing or malformed', () => {
		expect(errorsOf(signInSchema.safeParse({ email: '', password: 'x' }))).toHaveProperty('email');
		expect(errorsOf(signInSchema.safeParse({ email: 'not-an-email', password: 'x' })).email).toMatch(/valid email/);
		expect(errorsOf(signInSchema.safeParse({ email: 'a@b.example', password: '' })).password).toBe('Enter your password.');
		expect(errorsOf(signInSchema.safeParse({})).email).toBeTruthy();
	});
	it('keeps only same-origin redirect paths', () => {
		expect(signInSchema.parse({ email: 'a@b.example', password: 'x', redirectTo: '/models/12?tab=bench' }).redirectTo).toBe('/models/12?tab=bench');
		expect(signInSchema.parse({ email: 'a@b.example', password: 'x', redirectTo: 'https://evil.example/' }).redirectTo).toBeNull();
	});
});

describe('safeRedirectPath', () => {
	it.each([
		['/register', '/register'],
		['/models/3#notes', '/models/3#notes'],
		['/register?site=1&sort=-tag', '/register?site=1&sort=-tag'],
		['/a/../admin/users', '/admin/users']
	])('accepts %s', (input, expected) => expect(safeRedirectPath(input)).toBe(expected));
	it.each([
		['https://evil.example/x'],
		['//evil.example/x'],
		['/\\evil.example'],
		['javascript:alert(1)'],
		['register'],
		['/sign\nin'],
		['/auth/callback/credentials'],
		['/signout'],
		[''],
		['/' + 'a'.repeat(2100)]
	])('refuses %s', (input) => expect(safeRedirectPath(input)).toBeNull());
	it('refuses non-strings', () => {
		expect(safeRedirectPath(null)).toBeNull();
		expect(safeRedirectPath(42)).toBeNull();
	});
});

describe('createUserSchema', () => {
	it('accepts a well-formed person', () => {
		expect(createUserSchema.parse({ email: 'New.Person@Brackwater.Example', name: ' Ada Quill ', role: 'engineer' })).toEqual({
			email: 'new.person@brackwater.example',
			name: 'Ada Quill',
			role: 'engineer'
		});
	});
	it('names each bad field', () => {
		const e = errorsOf(createUserSchema.safeParse({ email: 'x', name: '', role: 'root' }));
		expect(Object.keys(e).sort()).toEqual(['email', 'name', 'role']);
		expect(e.role).toMatch(/viewer, engineer, reviewer, admin/);
	});
	it('limits lengths: email 254, name 120', () => {
		const long = 'a'.repeat(250) + '@b.example';
		expect(errorsOf(createUserSchema.safeParse({ email: long, name: 'A', role: 'viewer' })).email).toMatch(/254/);
		expect(errorsOf(createUserSchema.safeParse({ email: 'a@b.example', name: 'n'.repeat(121), role: 'viewer' })).name).toMatch(/120/);
		expect(createUserSchema.safeParse({ email: 'a@b.example', name: 'n'.repeat(120), role: 'viewer' }).success).toBe(true);
	});
	it('refuses control characters in names', () => {
		expect(errorsOf(createUserSchema.safeParse({ email: 'a@b.example', name: 'A\u0007B', role: 'viewer' })).name).toMatch(/control/);
	});
});

describe('user id fields', () => {
	it('coerce positive integers and refuse the rest', () => {
		expect(changeRoleSchema.parse({ userId: '7', role: 'admin' })).toEqual({ userId: 7, role: 'admin' });
		expect(userTargetSchema.parse({ userId: '12' }).userId).toBe(12);
		for (const bad of ['0', '-1', '1.5', 'abc', '', '4294967296']) {
			expect(errorsOf(userTargetSchema.safeParse({ userId: bad }))).toHaveProperty('userId');
		}
	});
});

describe('passwordChangeSchema', () => {
	const ok = { current: 'k7mq-3xz9-wr4t-h2pe', next: 'proofing oven zone four', confirm: 'proofing oven zone four' };
	it('accepts a good change', () => expect(passwordChangeSchema.parse(ok)).toEqual(ok));
	it('needs at least 12 characters', () => {
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, next: 'short1234', confirm: 'short1234' })).next).toMatch(/12 characters/);
		expect(passwordChangeSchema.safeParse({ ...ok, next: 'x'.repeat(12), confirm: 'x'.repeat(12) }).success).toBe(true);
	});
	it('refuses more than 72 bytes (bcrypt limit), counting UTF-8 bytes', () => {
		const pw73 = 'x'.repeat(73);
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, next: pw73, confirm: pw73 })).next).toMatch(/72 bytes/);
		const pw72 = 'x'.repeat(72);
		expect(passwordChangeSchema.safeParse({ ...ok, next: pw72, confirm: pw72 }).success).toBe(true);
		// 25 × "é" = 50 bytes; 13 × "€" = 39 bytes: 89 bytes in 38 characters.
		const multi = 'é'.repeat(25) + '€'.repeat(13);
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, next: multi, confirm: multi })).next).toMatch(/72 bytes/);
	});
	it('refuses a mismatch, the same password, and only spaces', () => {
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, confirm: 'something else!' })).confirm).toMatch(/differ/);
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, next: ok.current, confirm: ok.current })).next).toMatch(/different/);
		const spaces = ' '.repeat(14);
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, next: spaces, confirm: spaces })).next).toMatch(/only spaces/);
	});
	it('needs the current password', () => {
		expect(errorsOf(passwordChangeSchema.safeParse({ ...ok, current: '' })).current).toMatch(/current password/);
	});
});

describe('profile and token schemas', () => {
	it('profile name is trimmed and required', () => {
		expect(profileSchema.parse({ name: '  Priya Nair ' }).name).toBe('Priya Nair');
		expect(errorsOf(profileSchema.safeParse({ name: '   ' })).name).toBe('Enter a name.');
	});
	it('token name required, lifetime from the list, 90 days by default', () => {
		expect(apiTokenCreateSchema.parse({ name: 'nightly export' })).toEqual({ name: 'nightly export', lifetime: '90' });
		expect(apiTokenCreateSchema.parse({ name: 'x', lifetime: 'never' }).lifetime).toBe('never');
		expect(errorsOf(apiTokenCreateSchema.safeParse({ name: '', lifetime: '30' })).name).toMatch(/Name the token/);
		expect(errorsOf(apiTokenCreateSchema.safeParse({ name: 'x', lifetime: '7' })).lifetime).toMatch(/30, 90 or 365/);
		expect(errorsOf(apiTokenRevokeSchema.safeParse({ tokenId: 'x' }))).toHaveProperty('tokenId');
	});
});

describe('form helpers', () => {
	it('formFields keeps the first string value per key and drops files', () => {
		const fd = new FormData();
		fd.append('email', 'a@b.example');
		fd.append('email', 'second@b.example');
		fd.append('file', new Blob(['x']), 'x.txt');
		expect(formFields(fd)).toEqual({ email: 'a@b.example' });
	});
	it('fieldErrors keeps the first message per field', () => {
		const r = passwordChangeSchema.safeParse({ current: '', next: 'a', confirm: 'b' });
		const e = errorsOf(r);
		expect(Object.keys(e).sort()).toEqual(['confirm', 'current', 'next']);
	});
});
