/**
 * Password checking and the signed-in person. `authenticate` is the only place a password is
 * compared; it applies the throttle and writes the audit event of every attempt. `sessionUser`
 * re-reads a person from the database on each request, so deactivation and role changes apply
 * at once.
 */
import bcrypt from 'bcryptjs';
import { recordAudit } from './audit';
import { sequelize } from './db/connection';
import { User, initModels } from './db/models';
import { clearFailures, lockedUntil, registerFailure, throttleHash, throttleKeys } from './throttle';
import { isRole, type Role } from '../auth/roles';

/** bcrypt cost factor for new password hashes (2^11 rounds, ≈0.25 s here; OWASP asks ≥ 10 — from memory). */
export const BCRYPT_COST = 11;

/** A hash of a random password nobody knows: compared against when the email is unknown, so timing does not tell. */
const UNKNOWN_USER_HASH = '$2b$11$T81dEd1UAC3NNeRHc6zyQ.SYrPCSNzkH1XRWi4N0MRogSMqSNeav.';

/** The signed-in person as the rest of the app sees it (`locals.user`). */
export interface SessionUser {
	id: number;
	email: string;
	name: string;
	role: Role;
	/** Signed in with a one-time password: must choose a new one before anything else. */
	mustChangePassword: boolean;
}

/** Outcome of one sign-in attempt. */
export type SignInOutcome =
	| { ok: true; user: SessionUser }
	| { ok: false; reason: 'invalid' }
	| { ok: false; reason: 'inactive' }
	| { ok: false; reason: 'locked'; retryAt: Date };

/** bcrypt hash of `password` with `BCRYPT_COST`. */
export async function hashPassword(password: string): Promise<string> {
	return bcrypt.hash(password, BCRYPT_COST);
}

/** True when `password` matches the bcrypt `hash`. */
export async function verifyPassword(password: string, hash: string): Promise<boolean> {
	try {
		return await bcrypt.compare(password, hash);
	} catch {
		return false;
	}
}

/** The whitelisted session view of a user row (null when the row's role is unknown). */
export function toSessionUser(u: User): SessionUser | null {
	if (!isRole(u.role)) return null;
	return {
		id: Number(u.id),
		email: u.email,
		name: u.name,
		role: u.role,
		mustChangePassword: Boolean(u.must_change_password)
	};
}

/** The active user with this id, freshly read; null when missing or deactivated. */
export async function sessionUser(id: number): Promise<SessionUser | null> {
	if (!Number.isSafeInteger(id) || id <= 0) return null;
	initModels();
	const u = await User.findByPk(id, {
		attributes: ['id', 'email', 'name', 'role', 'active', 'must_change_password']
	});
	if (!u || !u.active) return null;
	return toSessionUser(u);
}

/**
 * Check an email and password. Refuses while the throttle holds the email or address (without
 * looking at the password), counts failures, resets the email's count on success, stamps
 * `last_sign_in_at`, and audits every attempt (`auth.signin` / `auth.signin_failed`, never the password).
 */
export async function authenticate(
	emailInput: string,
	password: string,
	clientAddress: string | null,
	now = new Date()
): Promise<SignInOutcome> {
	initModels();
	const email = emailInput.trim().toLowerCase();
	const keys = throttleKeys(email);
	const lock = await lockedUntil(keys, now);
	const user = await User.findOne({ where: { email } });
	const auditTarget = user
		? { entityId: Number(user.id), after: { email } }
		: { entityId: null, after: { emailHash: throttleHash('email', email).slice(0, 16) } };

	if (lock) {
		await sequelize().transaction(async (tx) => {
			await recordAudit(tx, {
				actor: null,
				action: 'auth.signin_failed',
				entityType: 'user',
				entityId: auditTarget.entityId,
				after: { ...auditTarget.after, reason: 'locked', lockedUntil: lock.toISOString() },
				ip: clientAddress
			});
		});
		return { ok: false, reason: 'locked', retryAt: lock };
	}

	const matches = await verifyPassword(password, user?.password_hash ?? UNKNOWN_USER_HASH);
	if (user && matches && user.active) {
		const sessionView = toSessionUser(user);
		if (sessionView) {
			await sequelize().transaction(async (tx) => {
				await clearFailures(tx, keys);
				await User.update({ last_sign_in_at: now }, { where: { id: user.id }, transaction: tx });
				await recordAudit(tx, {
					actor: { id: sessionView.id, email: sessionView.email },
					action: 'auth.signin',
					entityType: 'user',
					entityId: sessionView.id,
					ip: clientAddress
				});
			});
			return { ok: true, user: sessionView };
		}
	}

	const reason = !user ? 'unknown_email' : !matches ? 'wrong_password' : 'inactive';
	const retryAt = await sequelize().transaction(async (tx) => {
		const until = await registerFailure(tx, keys, now);
		await recordAudit(tx, {
			actor: null,
			action: 'auth.signin_failed',
			entityType: 'user',
			entityId: auditTarget.entityId,
			after: { ...auditTarget.after, reason, ...(until ? { lockedUntil: until.toISOString() } : {}) },
			ip: clientAddress
		});
		return until;
	});
	if (retryAt) return { ok: false, reason: 'locked', retryAt };
	// Only someone who knows the password learns that the account is deactivated.
	if (reason === 'inactive') return { ok: false, reason: 'inactive' };
	return { ok: false, reason: 'invalid' };
}

/** Audit a sign-out (its own small transaction; the session cookie is cleared by the caller). */
export async function recordSignOut(user: Pick<SessionUser, 'id' | 'email'>, clientAddress: string | null): Promise<void> {
	initModels();
	await sequelize().transaction(async (tx) => {
		await recordAudit(tx, { actor: user, action: 'auth.signout', entityType: 'user', entityId: user.id, ip: clientAddress });
	});
}
