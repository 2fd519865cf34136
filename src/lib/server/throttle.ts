/**
 * Sign-in throttle, stored in `sign_in_throttle` (no process memory, so it holds across restarts
 * and across several app servers). Keys are SHA-256 hashes of the lower-cased email; the raw
 * value is never stored. After `maxFailures` failures within the
 * window a key is locked for `lockSeconds`; every further failure after a lock doubles the lock
 * (exponential back-off, capped at 24 h). Lockout with back-off is common practice
 * (OWASP Authentication Cheat Sheet, "Account lockout"; from memory).
 */
import { createHash } from 'node:crypto';
import type { Transaction } from 'sequelize';
import { Op } from 'sequelize';
import { env } from './env';
import { sequelize } from './db/connection';
import { SignInThrottle, initModels } from './db/models';

/** Failures older than this (after the last failure or the end of the last lock) are forgotten, in seconds. */
export const FAILURE_WINDOW_SECONDS = 15 * 60;
/** Longest lock the back-off can reach, in seconds. */
export const MAX_LOCK_SECONDS = 24 * 60 * 60;

/** One throttled identity: the hash stored and the failures it may have before locking. */
export interface ThrottleKey {
	hash: string;
	maxFailures: number;
	kind: 'email';
}

/** The throttle settings in force (from SIGNIN_MAX_FAILURES and SIGNIN_LOCK_SECONDS). */
export interface ThrottleSettings {
	maxFailures: number;
	lockSeconds: number;
}

/** Settings read from the validated environment. */
export function throttleSettings(): ThrottleSettings {
	const e = env();
	return { maxFailures: e.SIGNIN_MAX_FAILURES, lockSeconds: e.SIGNIN_LOCK_SECONDS };
}

/** SHA-256 (hex) of `kind:value`, the value trimmed and lower-cased. */
export function throttleHash(kind: 'email' | 'address', value: string): string {
	return createHash('sha256').update(`${kind}:${value.trim().toLowerCase()}`).digest('hex');
}

/**
 * The keys one sign-in attempt counts against: its email. Client addresses are deliberately not
 * locked: behind a proxy without a configured address header every person shares one address,
 * and one attacker could then lock everybody out.
 */
export function throttleKeys(email: string, settings = throttleSettings()): ThrottleKey[] {
	return [{ hash: throttleHash('email', email), maxFailures: settings.maxFailures, kind: 'email' }];
}

/** Lock length in seconds after `failures` failures (0 when below the limit): lockSeconds·2^(failures−max), capped. */
export function lockSecondsFor(failures: number, maxFailures: number, lockSeconds: number): number {
	if (failures < maxFailures) return 0;
	const exponent = Math.min(failures - maxFailures, 30);
	return Math.min(lockSeconds * 2 ** exponent, MAX_LOCK_SECONDS);
}

/** The latest time any of `keys` stays locked until, or null when none is locked at `now`. */
export async function lockedUntil(keys: ThrottleKey[], now = new Date(), transaction?: Transaction): Promise<Date | null> {
	initModels();
	const rows = await SignInThrottle.findAll({
		where: { key_hash: { [Op.in]: keys.map((k) => k.hash) }, locked_until: { [Op.gt]: now } },
		transaction
	});
	let until: Date | null = null;
	for (const r of rows) {
		const t = r.locked_until ? new Date(r.locked_until) : null;
		if (t && (!until || t > until)) until = t;
	}
	return until;
}

/**
 * Count one failure against every key (inside `transaction`, rows locked) and return the time
 * the attempt's identity is now locked until, or null when it may try again at once.
 */
export async function registerFailure(
	transaction: Transaction,
	keys: ThrottleKey[],
	now = new Date(),
	settings = throttleSettings()
): Promise<Date | null> {
	initModels();
	let until: Date | null = null;
	for (const key of keys) {
		// Make sure the row exists, then lock it, so concurrent failures count one by one.
		await sequelize().query(
			'INSERT INTO sign_in_throttle (key_hash, failures, last_failure_at, locked_until) VALUES (?, 0, NULL, NULL) ON DUPLICATE KEY UPDATE key_hash = key_hash',
			{ replacements: [key.hash], transaction }
		);
		const row = await SignInThrottle.findByPk(key.hash, { transaction, lock: transaction.LOCK.UPDATE });
		if (!row) throw new Error('sign_in_throttle row vanished inside its transaction');
		const last = Math.max(
			row.last_failure_at ? new Date(row.last_failure_at).getTime() : 0,
			row.locked_until ? new Date(row.locked_until).getTime() : 0
		);
		const stale = now.getTime() - last > FAILURE_WINDOW_SECONDS * 1000;
		const failures = (stale ? 0 : row.failures) + 1;
		const lock = lockSecondsFor(failures, key.maxFailures, settings.lockSeconds);
		const lockedTo = lock > 0 ? new Date(now.getTime() + lock * 1000) : null;
		await SignInThrottle.update(
			{ failures, last_failure_at: now, locked_until: lockedTo },
			{ where: { key_hash: key.hash }, transaction }
		);
		if (lockedTo && (!until || lockedTo > until)) until = lockedTo;
	}
	return until;
}

/** Forget the failures of the given keys (after a successful sign-in, for the email key). */
export async function clearFailures(transaction: Transaction, keys: ThrottleKey[]): Promise<void> {
	initModels();
	await SignInThrottle.destroy({ where: { key_hash: { [Op.in]: keys.map((k) => k.hash) } }, transaction });
}
