/**
 * People: the admin side (list, create with a one-time password, change role, deactivate,
 * reactivate, issue a new one-time password) and the own-profile side (name, password). Each
 * write runs in one transaction with its audit event. The last active administrator can never
 * be removed, demoted or deactivated, by anyone including themselves.
 */
import { randomInt } from 'node:crypto';
import { UniqueConstraintError, type Transaction } from 'sequelize';
import { recordAudit } from './audit';
import { hashPassword, verifyPassword, type SessionUser } from './auth';
import { sequelize } from './db/connection';
import { User, initModels } from './db/models';
import { Conflict, InvalidInput, NotFound } from './errors';
import { assertCan, type Role } from '../auth/roles';

/** A user as shown on the admin page (no password hash). */
export interface UserDto {
	id: number;
	email: string;
	name: string;
	role: Role;
	active: boolean;
	mustChangePassword: boolean;
	lastSignInAt: string | null;
	createdAt: string;
}

/** Who is acting, for services: the signed-in person and their client address. */
export interface Acting {
	user: SessionUser;
	ip?: string | null;
}

function toDto(u: User): UserDto {
	return {
		id: Number(u.id),
		email: u.email,
		name: u.name,
		role: u.role,
		active: Boolean(u.active),
		mustChangePassword: Boolean(u.must_change_password),
		lastSignInAt: u.last_sign_in_at ? new Date(u.last_sign_in_at).toISOString() : null,
		createdAt: new Date(u.created_at).toISOString()
	};
}

/** The audited snapshot of a user: whitelisted fields only. */
function snapshot(u: User): Record<string, unknown> {
	return { email: u.email, name: u.name, role: u.role, active: Boolean(u.active), mustChangePassword: Boolean(u.must_change_password) };
}

/**
 * A one-time password: 4 groups of 4 characters from a 31-character alphabet without look-alikes
 * (31^16 ≈ 2^79 possibilities), e.g. `k7mq-3xz9-wr4t-h2pe`.
 */
export function generateOneTimePassword(): string {
	const alphabet = 'abcdefghjkmnpqrstuvwxyz23456789';
	const groups: string[] = [];
	for (let g = 0; g < 4; g++) {
		let s = '';
		for (let i = 0; i < 4; i++) s += alphabet[randomInt(alphabet.length)];
		groups.push(s);
	}
	return groups.join('-');
}

/** Every user, administrators first, then by name. Admins only. */
export async function listUsers(acting: Acting): Promise<UserDto[]> {
	assertCan(acting.user.role, 'user.manage');
	initModels();
	const rows = await User.findAll({ order: [['active', 'DESC'], ['name', 'ASC'], ['id', 'ASC']] });
	return rows.map(toDto);
}

/** Create a user who must change the returned one-time password at first sign-in. Admins only. */
export async function createUser(
	acting: Acting,
	input: { email: string; name: string; role: Role }
): Promise<{ user: UserDto; oneTimePassword: string }> {
	assertCan(acting.user.role, 'user.manage');
	initModels();
	const oneTimePassword = generateOneTimePassword();
	const password_hash = await hashPassword(oneTimePassword);
	try {
		return await sequelize().transaction(async (tx) => {
			const u = await User.create(
				{
					email: input.email.trim().toLowerCase(),
					name: input.name.trim(),
					role: input.role,
					password_hash,
					must_change_password: true,
					active: true,
					last_sign_in_at: null
				},
				{ transaction: tx }
			);
			await recordAudit(tx, {
				actor: acting.user,
				action: 'user.create',
				entityType: 'user',
				entityId: Number(u.id),
				before: null,
				after: snapshot(u),
				ip: acting.ip
			});
			return { user: toDto(u), oneTimePassword };
		});
	} catch (e) {
		if (e instanceof UniqueConstraintError) throw new InvalidInput('email', 'A user with this email address already exists.');
		throw e;
	}
}

async function lockTarget(tx: Transaction, userId: number): Promise<User> {
	const u = await User.findByPk(userId, { transaction: tx, lock: tx.LOCK.UPDATE });
	if (!u) throw new NotFound('No such user.');
	return u;
}

/**
 * Lock the rows of every active administrator (always first, in index order, so two admins
 * changing each other at the same time queue instead of deadlocking) and return their ids.
 */
async function lockActiveAdmins(tx: Transaction): Promise<number[]> {
	const admins = await User.findAll({
		where: { role: 'admin', active: true },
		attributes: ['id'],
		order: [['id', 'ASC']],
		transaction: tx,
		lock: tx.LOCK.UPDATE
	});
	return admins.map((a) => Number(a.id));
}

/** Refuse when `target` is the only active administrator. */
function assertNotLastAdmin(activeAdmins: number[], target: User, what: string): void {
	if (target.role !== 'admin' || !target.active) return;
	if (activeAdmins.length <= 1) {
		throw new Conflict(`${what} would leave no active administrator. Make someone else an administrator first.`);
	}
}

/** Change a user's role (takes effect on their next request). Admins only; never the last admin. */
export async function changeRole(acting: Acting, userId: number, role: Role): Promise<UserDto> {
	assertCan(acting.user.role, 'user.manage');
	initModels();
	return sequelize().transaction(async (tx) => {
		const admins = await lockActiveAdmins(tx);
		const u = await lockTarget(tx, userId);
		if (u.role === role) return toDto(u);
		if (role !== 'admin') assertNotLastAdmin(admins, u, 'Changing this role');
		const before = snapshot(u);
		u.role = role;
		await u.save({ transaction: tx });
		await recordAudit(tx, {
			actor: acting.user,
			action: 'user.role_change',
			entityType: 'user',
			entityId: Number(u.id),
			before,
			after: snapshot(u),
			ip: acting.ip
		});
		return toDto(u);
	});
}

/** Deactivate (signed out at their next request, tokens stop working) or reactivate a user. Admins only; never the last admin. */
export async function setActive(acting: Acting, userId: number, active: boolean): Promise<UserDto> {
	assertCan(acting.user.role, 'user.manage');
	initModels();
	return sequelize().transaction(async (tx) => {
		const admins = await lockActiveAdmins(tx);
		const u = await lockTarget(tx, userId);
		if (Boolean(u.active) === active) return toDto(u);
		if (!active) assertNotLastAdmin(admins, u, 'Deactivating this account');
		const before = snapshot(u);
		u.active = active;
		await u.save({ transaction: tx });
		await recordAudit(tx, {
			actor: acting.user,
			action: active ? 'user.reactivate' : 'user.deactivate',
			entityType: 'user',
			entityId: Number(u.id),
			before,
			after: snapshot(u),
			ip: acting.ip
		});
		return toDto(u);
	});
}

/** Replace a user's password with a new one-time password (shown once; must be changed at sign-in). Admins only. */
export async function issueOneTimePassword(acting: Acting, userId: number): Promise<{ user: UserDto; oneTimePassword: string }> {
	assertCan(acting.user.role, 'user.manage');
	initModels();
	const oneTimePassword = generateOneTimePassword();
	const password_hash = await hashPassword(oneTimePassword);
	return sequelize().transaction(async (tx) => {
		const u = await lockTarget(tx, userId);
		const before = snapshot(u);
		u.password_hash = password_hash;
		u.must_change_password = true;
		await u.save({ transaction: tx });
		await recordAudit(tx, {
			actor: acting.user,
			action: 'user.password_reset',
			entityType: 'user',
			entityId: Number(u.id),
			before,
			after: snapshot(u),
			ip: acting.ip
		});
		return { user: toDto(u), oneTimePassword };
	});
}

/** The acting person's own account. */
export async function ownAccount(acting: Acting): Promise<UserDto> {
	assertCan(acting.user.role, 'profile.edit_own');
	initModels();
	const u = await User.findByPk(acting.user.id);
	if (!u) throw new NotFound('Your account no longer exists.');
	return toDto(u);
}

/** Change one's own display name. */
export async function updateOwnName(acting: Acting, name: string): Promise<UserDto> {
	assertCan(acting.user.role, 'profile.edit_own');
	initModels();
	return sequelize().transaction(async (tx) => {
		const u = await lockTarget(tx, acting.user.id);
		if (u.name === name) return toDto(u);
		const before = snapshot(u);
		u.name = name;
		await u.save({ transaction: tx });
		await recordAudit(tx, { actor: acting.user, action: 'user.profile_update', entityType: 'user', entityId: Number(u.id), before, after: snapshot(u), ip: acting.ip });
		return toDto(u);
	});
}

/** Change one's own password after checking the current one; clears the must-change flag. */
export async function changeOwnPassword(acting: Acting, current: string, next: string): Promise<UserDto> {
	assertCan(acting.user.role, 'profile.edit_own');
	initModels();
	const existing = await User.findByPk(acting.user.id);
	if (!existing) throw new NotFound('Your account no longer exists.');
	if (!(await verifyPassword(current, existing.password_hash))) {
		throw new InvalidInput('current', 'The current password is not right.');
	}
	if (next.trim().toLowerCase() === existing.email.toLowerCase()) {
		throw new InvalidInput('next', 'Do not use your email address as your password.');
	}
	const password_hash = await hashPassword(next);
	return sequelize().transaction(async (tx) => {
		const u = await lockTarget(tx, acting.user.id);
		const before = snapshot(u);
		u.password_hash = password_hash;
		u.must_change_password = false;
		await u.save({ transaction: tx });
		await recordAudit(tx, { actor: acting.user, action: 'user.password_change', entityType: 'user', entityId: Number(u.id), before, after: snapshot(u), ip: acting.ip });
		return toDto(u);
	});
}
