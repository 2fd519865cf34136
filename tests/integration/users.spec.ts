/**
 * Users administration, sign-in throttle, API tokens and the audit log against a real MariaDB
 * (DB_* from env). Every person the test creates has a unique email under `@authspec.invalid`, so
 * other data in the database does not matter. SHA-256 is checked against the FIPS 180-2 test
 * vector (Appendix B.1, "abc"); bcrypt hashes are checked with bcryptjs's own `compare`.
 */
import { createHash } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateUp } from '../../src/lib/server/db/migrator';
import { closeDatabase, sequelize } from '../../src/lib/server/db/connection';
import { ApiToken, AuditEvent, SignInThrottle, User, initModels } from '../../src/lib/server/db/models';
import * as audit from '../../src/lib/server/audit';
import { recordAudit, redactForAudit } from '../../src/lib/server/audit';
import { authenticate, hashPassword, sessionUser, type SessionUser } from '../../src/lib/server/auth';
import { Conflict, InvalidInput, NotFound } from '../../src/lib/server/errors';
import { FAILURE_WINDOW_SECONDS, lockSecondsFor, throttleHash } from '../../src/lib/server/throttle';
import { createApiToken, hashToken, listApiTokens, revokeApiToken, userForToken } from '../../src/lib/server/tokens';
import {
	changeOwnPassword,
	changeRole,
	createUser,
	generateOneTimePassword,
	issueOneTimePassword,
	listUsers,
	setActive,
	updateOwnName,
	type Acting
} from '../../src/lib/server/users';
import { PermissionDenied, type Role } from '../../src/lib/auth/roles';
import { resetEnvCache } from '../../src/lib/server/env';

const RUN = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;
const mail = (who: string) => `${who}.${RUN}@authspec.invalid`;
const PASSWORD = 'bakery line three mixer';

let admin: SessionUser;
const made: number[] = [];

async function person(who: string, role: Role, password = PASSWORD): Promise<SessionUser> {
	const u = await User.create({
		email: mail(who),
		name: `Spec ${who}`,
		role,
		password_hash: await bcrypt.hash(password, 10),
		last_sign_in_at: null
	});
	made.push(Number(u.id));
	return { id: Number(u.id), email: u.email, name: u.name, role, mustChangePassword: false };
}

const as = (user: SessionUser): Acting => ({ user, ip: '127.0.0.1' });

async function auditRows(action: string, entityId: number | string) {
	return AuditEvent.findAll({ where: { action, entity_id: String(entityId) }, order: [['id', 'ASC']] });
}

beforeAll(async () => {
	delete process.env.SIGNIN_MAX_FAILURES;
	delete process.env.SIGNIN_LOCK_SECONDS;
	resetEnvCache();
	await migrateUp();
	initModels();
	admin = await person('admin', 'admin');
});

afterAll(async () => {
	await closeDatabase();
});

describe('createUser', () => {
	it('creates a person with a one-time password they must change, audited without secrets', async () => {
		const { user, oneTimePassword } = await createUser(as(admin), { email: mail('new').toUpperCase(), name: 'Ada Quill', role: 'engineer' });
		made.push(user.id);
		expect(user).toMatchObject({ email: mail('new'), name: 'Ada Quill', role: 'engineer', active: true, mustChangePassword: true, lastSignInAt: null });
		expect(oneTimePassword).toMatch(/^[a-z2-9]{4}-[a-z2-9]{4}-[a-z2-9]{4}-[a-z2-9]{4}$/);
		const row = await User.findByPk(user.id);
		expect(row!.password_hash).toMatch(/^\$2[aby]\$11\$/);
		expect(await bcrypt.compare(oneTimePassword, row!.password_hash)).toBe(true);
		const [event] = await auditRows('user.create', user.id);
		expect(event.actor_id).toBe(admin.id);
		expect(event.after).toEqual({ email: mail('new'), name: 'Ada Quill', role: 'engineer', active: true, mustChangePassword: true });
		const text = JSON.stringify([event.before, event.after]);
		expect(text).not.toContain(row!.password_hash);
		expect(text).not.toContain(oneTimePassword);
		expect(text).not.toMatch(/password_hash/);
	});
	it('refuses a duplicate email, naming the field', async () => {
		await expect(createUser(as(admin), { email: mail('new'), name: 'Again', role: 'viewer' })).rejects.toSatisfy(
			(e: unknown) => e instanceof InvalidInput && e.fieldErrors.email === 'A user with this email address already exists.'
		);
	});
	it('generates distinct one-time passwords', () => {
		const set = new Set(Array.from({ length: 200 }, () => generateOneTimePassword()));
		expect(set.size).toBe(200);
	});
});

describe('only administrators manage people (checked inside the service)', () => {
	it.each(['viewer', 'engineer', 'reviewer'] as const)('%s is refused everywhere', async (role) => {
		const actor = await person(`not-admin-${role}`, role);
		const target = await person(`target-${role}`, 'viewer');
		await expect(listUsers(as(actor))).rejects.toBeInstanceOf(PermissionDenied);
		await expect(createUser(as(actor), { email: mail(`x-${role}`), name: 'X', role: 'admin' })).rejects.toBeInstanceOf(PermissionDenied);
		await expect(changeRole(as(actor), target.id, 'admin')).rejects.toBeInstanceOf(PermissionDenied);
		await expect(changeRole(as(actor), actor.id, 'admin')).rejects.toBeInstanceOf(PermissionDenied);
		await expect(setActive(as(actor), target.id, false)).rejects.toBeInstanceOf(PermissionDenied);
		await expect(issueOneTimePassword(as(actor), target.id)).rejects.toBeInstanceOf(PermissionDenied);
		expect((await User.findByPk(actor.id))!.role).toBe(role);
		expect((await User.findByPk(target.id))!.active).toBe(true);
		expect(await User.count({ where: { email: mail(`x-${role}`) } })).toBe(0);
	});
});

describe('changeRole and setActive', () => {
	it('changes a role with an audited before/after, effective on the next request', async () => {
		const p = await person('promote', 'viewer');
		const dto = await changeRole(as(admin), p.id, 'reviewer');
		expect(dto.role).toBe('reviewer');
		expect((await sessionUser(p.id))!.role).toBe('reviewer');
		const [event] = await auditRows('user.role_change', p.id);
		expect((event.before as { role: string }).role).toBe('viewer');
		expect((event.after as { role: string }).role).toBe('reviewer');
		expect(event.ip).toBe('127.0.0.1');
	});
	it('deactivates (session ends, sign-in refused) and reactivates, each audited', async () => {
		const p = await person('leaver', 'engineer');
		await setActive(as(admin), p.id, false);
		expect(await sessionUser(p.id)).toBeNull();
		expect(await authenticate(p.email, PASSWORD, null)).toEqual({ ok: false, reason: 'inactive' });
		await setActive(as(admin), p.id, true);
		expect((await sessionUser(p.id))!.id).toBe(p.id);
		expect((await authenticate(p.email, PASSWORD, null)).ok).toBe(true);
		expect(await auditRows('user.deactivate', p.id)).toHaveLength(1);
		expect(await auditRows('user.reactivate', p.id)).toHaveLength(1);
	});
	it('answers NotFound for a missing user', async () => {
		await expect(changeRole(as(admin), 4_000_000_000, 'viewer')).rejects.toBeInstanceOf(NotFound);
		await expect(setActive(as(admin), 4_000_000_000, false)).rejects.toBeInstanceOf(NotFound);
	});
});

describe('the last active administrator', () => {
	it('cannot be demoted or deactivated, by anyone including themselves; a second admin makes it possible', async () => {
		const others = await User.findAll({ where: { role: 'admin', active: true, id: { [Op.ne]: admin.id } } });
		const otherIds = others.map((u) => Number(u.id));
		// Make `admin` the only active administrator for this test, and put everything back after.
		if (otherIds.length) await User.update({ active: false }, { where: { id: otherIds } });
		try {
			await expect(changeRole(as(admin), admin.id, 'engineer')).rejects.toBeInstanceOf(Conflict);
			await expect(setActive(as(admin), admin.id, false)).rejects.toThrow(/no active administrator/);
			const row = await User.findByPk(admin.id);
			expect(row!.role).toBe('admin');
			expect(row!.active).toBe(true);
			expect(await auditRows('user.role_change', admin.id)).toHaveLength(0);

			const second = await person('second-admin', 'admin');
			await changeRole(as(second), admin.id, 'reviewer');
			expect((await User.findByPk(admin.id))!.role).toBe('reviewer');
			// Now `second` is the last one.
			await expect(setActive(as(second), second.id, false)).rejects.toBeInstanceOf(Conflict);
			await expect(changeRole(as(second), second.id, 'viewer')).rejects.toBeInstanceOf(Conflict);
			await changeRole(as(second), admin.id, 'admin');
		} finally {
			if (otherIds.length) await User.update({ active: true }, { where: { id: otherIds } });
		}
	});
});

describe('two administrators demoting each other at the same moment', () => {
	it('one change wins, the other is refused, and an administrator remains', async () => {
		const a = await person('race-a', 'admin');
		const b = await person('race-b', 'admin');
		const others = await User.findAll({ where: { role: 'admin', active: true, id: { [Op.notIn]: [a.id, b.id] } } });
		const otherIds = others.map((u) => Number(u.id));
		if (otherIds.length) await User.update({ active: false }, { where: { id: otherIds } });
		try {
			const results = await Promise.allSettled([changeRole(as(a), b.id, 'engineer'), changeRole(as(b), a.id, 'engineer')]);
			expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
			const refused = results.find((r) => r.status === 'rejected') as PromiseRejectedResult;
			expect(refused.reason).toBeInstanceOf(Conflict);
			expect(await User.count({ where: { id: [a.id, b.id], role: 'admin', active: true } })).toBe(1);
		} finally {
			if (otherIds.length) await User.update({ active: true }, { where: { id: otherIds } });
			await User.update({ role: 'viewer', active: false }, { where: { id: [a.id, b.id] } });
		}
	});
});

describe('each write and its audit event share one transaction', () => {
	it('a failing audit insert after the update leaves no partial state', async () => {
		const p = await person('atomic', 'viewer');
		const trigger = `authspec_fail_${RUN}`.replace(/[^a-z0-9_]/gi, '_');
		// A real failure inside the database, after the UPDATE of users, on the audit INSERT.
		await sequelize().query(
			`CREATE TRIGGER ${trigger} BEFORE INSERT ON audit_events FOR EACH ROW
			 BEGIN IF NEW.entity_id = '${p.id}' AND NEW.action IN ('user.role_change', 'user.deactivate') THEN
			 SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit insert refused by test'; END IF; END`
		);
		try {
			await expect(changeRole(as(admin), p.id, 'engineer')).rejects.toThrow(/audit insert refused by test/);
			await expect(setActive(as(admin), p.id, false)).rejects.toThrow(/audit insert refused by test/);
		} finally {
			await sequelize().query(`DROP TRIGGER IF EXISTS ${trigger}`);
		}
		const row = await User.findByPk(p.id);
		expect(row!.role).toBe('viewer');
		expect(row!.active).toBe(true);
		expect(await auditRows('user.role_change', p.id)).toHaveLength(0);
		// And with the trigger gone the same change goes through, with its event.
		await changeRole(as(admin), p.id, 'engineer');
		expect(await auditRows('user.role_change', p.id)).toHaveLength(1);
	});
	it('recordAudit needs a transaction', async () => {
		await expect(recordAudit(undefined as never, { actor: null, action: 'user.create', entityType: 'user' })).rejects.toThrow(/transaction/);
	});
	it('the audit module offers no way to change or remove events, and the database refuses both', async () => {
		expect(Object.keys(audit).sort()).toEqual(['auditTrail', 'recentAudit', 'recordAudit', 'redactForAudit']);
		const [event] = await AuditEvent.findAll({ limit: 1, order: [['id', 'DESC']] });
		await expect(AuditEvent.update({ action: 'tampered' }, { where: { id: event.id } })).rejects.toThrow(/append-only/);
		await expect(AuditEvent.destroy({ where: { id: event.id } })).rejects.toThrow(/append-only/);
	});
	it('redacts secrets at any depth and never stores NaN or Infinity', () => {
		expect(
			redactForAudit({ name: 'A', password: 'p', nested: { password_hash: 'h', token: 't', keep: 1 }, list: [{ secret: 's', n: NaN }], inf: Infinity })
		).toEqual({ name: 'A', nested: { keep: 1 }, list: [{ n: null }], inf: null });
	});
});

describe('own profile', () => {
	it('changes the own name, audited', async () => {
		const p = await person('renamer', 'viewer');
		expect((await updateOwnName(as(p), 'Renamed Person')).name).toBe('Renamed Person');
		expect(await auditRows('user.profile_update', p.id)).toHaveLength(1);
	});
	it('changes the own password only with the current one, and clears the must-change flag', async () => {
		const { user, oneTimePassword } = await createUser(as(admin), { email: mail('first-timer'), name: 'First Timer', role: 'viewer' });
		made.push(user.id);
		const signedIn = await authenticate(mail('first-timer'), oneTimePassword, null);
		expect(signedIn.ok && signedIn.user.mustChangePassword).toBe(true);
		const me = (await sessionUser(user.id))!;
		await expect(changeOwnPassword(as(me), 'not the one', 'a brand new passphrase')).rejects.toSatisfy(
			(e: unknown) => e instanceof InvalidInput && 'current' in e.fieldErrors
		);
		await expect(changeOwnPassword(as(me), oneTimePassword, mail('first-timer'))).rejects.toSatisfy(
			(e: unknown) => e instanceof InvalidInput && 'next' in e.fieldErrors
		);
		const dto = await changeOwnPassword(as(me), oneTimePassword, 'a brand new passphrase');
		expect(dto.mustChangePassword).toBe(false);
		expect((await authenticate(mail('first-timer'), oneTimePassword, null)).ok).toBe(false);
		const again = await authenticate(mail('first-timer'), 'a brand new passphrase', null);
		expect(again.ok && again.user.mustChangePassword).toBe(false);
		expect(await auditRows('user.password_change', user.id)).toHaveLength(1);
	});
	it('an admin-issued one-time password replaces the old password', async () => {
		const p = await person('forgetful', 'engineer');
		const { oneTimePassword } = await issueOneTimePassword(as(admin), p.id);
		expect((await authenticate(p.email, PASSWORD, null)).ok).toBe(false);
		const r = await authenticate(p.email, oneTimePassword, null);
		expect(r.ok && r.user.mustChangePassword).toBe(true);
	});
});

describe('sign-in throttle (SIGNIN_MAX_FAILURES = 5, SIGNIN_LOCK_SECONDS = 300 by default)', () => {
	const t0 = new Date('2026-05-04T08:00:00.000Z');
	const at = (seconds: number) => new Date(t0.getTime() + seconds * 1000);

	it('back-off doubles the lock per failure past the limit, capped at 24 h', () => {
		expect([4, 5, 6, 7, 8].map((f) => lockSecondsFor(f, 5, 300))).toEqual([0, 300, 600, 1200, 2400]);
		expect(lockSecondsFor(40, 5, 300)).toBe(86_400);
		expect(lockSecondsFor(1, 1, 60)).toBe(60);
	});

	it('locks after 5 failures, refuses even the right password while locked, then backs off', async () => {
		const p = await person('throttled', 'viewer');
		for (let i = 0; i < 4; i++) expect(await authenticate(p.email, 'wrong guess', '10.0.0.9', at(i))).toEqual({ ok: false, reason: 'invalid' });
		expect(await authenticate(p.email.toUpperCase(), 'wrong guess', '10.0.0.9', at(4))).toEqual({ ok: false, reason: 'locked', retryAt: at(4 + 300) });
		// Locked: the right password does not help, and the lock does not grow from refused attempts.
		expect(await authenticate(p.email, PASSWORD, null, at(100))).toEqual({ ok: false, reason: 'locked', retryAt: at(304) });
		// After the lock: one more failure locks again, twice as long.
		expect(await authenticate(p.email, 'wrong guess', null, at(305))).toEqual({ ok: false, reason: 'locked', retryAt: at(305 + 600) });
		// After that lock: the right password works and clears the count.
		const ok = await authenticate(p.email, PASSWORD, null, at(906));
		expect(ok.ok).toBe(true);
		expect(await SignInThrottle.findByPk(throttleHash('email', p.email))).toBeNull();
		expect((await User.findByPk(p.id))!.last_sign_in_at!.toISOString()).toBe(at(906).toISOString());

		const failures = await auditRows('auth.signin_failed', p.id);
		expect(failures.map((e) => (e.after as { reason: string }).reason)).toEqual([
			'wrong_password', 'wrong_password', 'wrong_password', 'wrong_password', 'wrong_password', 'locked', 'wrong_password'
		]);
		expect(failures[0].ip).toBe('10.0.0.9');
		const text = JSON.stringify(failures.map((e) => e.after));
		expect(text).not.toContain('wrong guess');
		expect(text).not.toContain(PASSWORD);
		expect(await auditRows('auth.signin', p.id)).toHaveLength(1);
	});

	it('forgets failures older than the window', async () => {
		const p = await person('slow-typist', 'viewer');
		for (let i = 0; i < 4; i++) await authenticate(p.email, 'nope', null, at(i));
		expect(await authenticate(p.email, 'nope', null, at(3 + FAILURE_WINDOW_SECONDS + 1))).toEqual({ ok: false, reason: 'invalid' });
		const row = await SignInThrottle.findByPk(throttleHash('email', p.email));
		expect(row!.failures).toBe(1);
	});

	it('throttles unknown emails too, storing only hashes', async () => {
		const ghost = mail('ghost');
		for (let i = 0; i < 5; i++) await authenticate(ghost, 'whatever', null, at(i));
		expect((await authenticate(ghost, 'whatever', null, at(10))).ok).toBe(false);
		const row = await SignInThrottle.findByPk(throttleHash('email', ghost));
		expect(row!.failures).toBe(5);
		expect(row!.key_hash).toBe(createHash('sha256').update(`email:${ghost}`).digest('hex'));
		const events = await AuditEvent.findAll({ where: { action: 'auth.signin_failed', entity_id: null }, order: [['id', 'DESC']], limit: 6 });
		expect(JSON.stringify(events.map((e) => e.after))).not.toContain(ghost);
	});

	it('honours SIGNIN_MAX_FAILURES and SIGNIN_LOCK_SECONDS from the environment', async () => {
		process.env.SIGNIN_MAX_FAILURES = '2';
		process.env.SIGNIN_LOCK_SECONDS = '60';
		resetEnvCache();
		try {
			const p = await person('strict', 'viewer');
			expect((await authenticate(p.email, 'x', null, at(0))).ok).toBe(false);
			expect(await authenticate(p.email, 'x', null, at(1))).toEqual({ ok: false, reason: 'locked', retryAt: at(61) });
		} finally {
			delete process.env.SIGNIN_MAX_FAILURES;
			delete process.env.SIGNIN_LOCK_SECONDS;
			resetEnvCache();
		}
	});
});

describe('API tokens', () => {
	it('hashes with SHA-256 (FIPS 180-2 Appendix B.1 test vector)', () => {
		expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
	});

	it('stores only the hash and prefix, acts with the owner’s current role, and stops when revoked', async () => {
		const owner = await person('scripter', 'engineer');
		const { token, dto } = await createApiToken(owner, { name: 'nightly export', lifetimeDays: 90 }, '127.0.0.1');
		expect(token).toMatch(/^llt_[a-z0-9]{8}_[A-Za-z0-9_-]{43}$/);
		expect(dto.prefix).toBe(token.slice(0, 12));
		expect(dto.status).toBe('active');
		const row = await ApiToken.findByPk(dto.id);
		expect(row!.token_hash).toBe(createHash('sha256').update(token).digest('hex'));
		expect(JSON.stringify(row!.toJSON())).not.toContain(token.slice(13));
		expect(JSON.stringify(await listApiTokens(owner))).not.toContain(row!.token_hash);

		expect((await userForToken(token))!.role).toBe('engineer');
		await changeRole(as(admin), owner.id, 'viewer');
		expect((await userForToken(token))!.role).toBe('viewer');
		await setActive(as(admin), owner.id, false);
		expect(await userForToken(token)).toBeNull();
		await setActive(as(admin), owner.id, true);
		expect(await userForToken(token)).not.toBeNull();
		expect((await ApiToken.findByPk(dto.id))!.last_used_at).not.toBeNull();

		const ownerNow = (await sessionUser(owner.id))!;
		const revoked = await revokeApiToken(ownerNow, dto.id, '127.0.0.1');
		expect(revoked.status).toBe('revoked');
		expect(await userForToken(token)).toBeNull();
		expect(await auditRows('api_token.create', dto.id)).toHaveLength(1);
		expect(await auditRows('api_token.revoke', dto.id)).toHaveLength(1);
	});

	it('refuses malformed, unknown and expired tokens, and other people’s revocations', async () => {
		const owner = await person('expiring', 'reviewer');
		const other = await person('nosy', 'admin');
		const now = new Date();
		const { token, dto } = await createApiToken(owner, { name: 'short-lived', lifetimeDays: 30 }, null, now);
		expect(await userForToken(token, new Date(now.getTime() + 29 * 86_400_000))).not.toBeNull();
		expect(await userForToken(token, new Date(now.getTime() + 30 * 86_400_000 + 1000))).toBeNull();
		expect(await userForToken(token.slice(0, -1) + (token.endsWith('A') ? 'B' : 'A'))).toBeNull();
		expect(await userForToken('not-a-token')).toBeNull();
		expect(await userForToken('')).toBeNull();
		await expect(revokeApiToken(other, dto.id)).rejects.toBeInstanceOf(NotFound);
		expect(await userForToken(token)).not.toBeNull();
	});

	it('a token with no expiry keeps working', async () => {
		const owner = await person('forever', 'viewer');
		const { token, dto } = await createApiToken(owner, { name: 'dashboard', lifetimeDays: null });
		expect(dto.expiresAt).toBeNull();
		expect(await userForToken(token, new Date(Date.now() + 3650 * 86_400_000))).not.toBeNull();
	});
});

describe('password hashing', () => {
	it('uses bcrypt with cost 11', async () => {
		const h = await hashPassword('proofing oven zone four');
		expect(h).toMatch(/^\$2[aby]\$11\$.{53}$/);
		expect(await bcrypt.compare('proofing oven zone four', h)).toBe(true);
	});
});
