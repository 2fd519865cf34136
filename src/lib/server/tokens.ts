/**
 * Personal API tokens for scripts (`Authorization: Bearer <token>` on `/api/v1/**`). A token is
 * shown once at creation; only its SHA-256 hash and a short prefix are stored. A token acts with
 * its owner's CURRENT role (read at each request) and stops working when revoked, expired or
 * when the owner is deactivated.
 */
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import { Op } from 'sequelize';
import { recordAudit } from './audit';
import { sessionUser, type SessionUser } from './auth';
import { sequelize } from './db/connection';
import { ApiToken, initModels } from './db/models';
import { NotFound } from './errors';
import { assertCan } from '../auth/roles';

/** Every token starts with this, so leaked tokens are easy to recognise and scan for. */
export const TOKEN_MARK = 'llt_';
const TOKEN_PATTERN = /^llt_([a-z0-9]{8})_([A-Za-z0-9_-]{43})$/;
/** last_used_at is refreshed at most this often, in milliseconds, to avoid a write per request. */
const LAST_USED_RESOLUTION_MS = 60_000;

/** An API token as shown to its owner (never the secret or its hash). */
export interface ApiTokenDto {
	id: number;
	name: string;
	prefix: string;
	createdAt: string;
	lastUsedAt: string | null;
	expiresAt: string | null;
	revokedAt: string | null;
	status: 'active' | 'expired' | 'revoked';
}

/** SHA-256 of the whole token, hex (64 characters): what is stored. */
export function hashToken(token: string): string {
	return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** A new random token: `llt_` + 8 lower-case letters/digits + `_` + 256 random bits in base64url. */
export function generateToken(): { token: string; prefix: string } {
	const alphabet = 'abcdefghijkmnopqrstuvwxyz23456789';
	const bytes = randomBytes(8);
	let id = '';
	for (const b of bytes) id += alphabet[b % alphabet.length];
	const secret = randomBytes(32).toString('base64url');
	const token = `${TOKEN_MARK}${id}_${secret}`;
	return { token, prefix: `${TOKEN_MARK}${id}` };
}

function status(t: ApiToken, now: Date): ApiTokenDto['status'] {
	if (t.revoked_at) return 'revoked';
	if (t.expires_at && new Date(t.expires_at) <= now) return 'expired';
	return 'active';
}

function toDto(t: ApiToken, now = new Date()): ApiTokenDto {
	const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
	return {
		id: Number(t.id),
		name: t.name,
		prefix: t.prefix,
		createdAt: new Date(t.created_at).toISOString(),
		lastUsedAt: iso(t.last_used_at),
		expiresAt: iso(t.expires_at),
		revokedAt: iso(t.revoked_at),
		status: status(t, now)
	};
}

/** Create a token for `actor`, valid for `lifetimeDays` (null: no expiry). Returns the token text once. */
export async function createApiToken(
	actor: SessionUser,
	input: { name: string; lifetimeDays: number | null },
	ip: string | null = null,
	now = new Date()
): Promise<{ token: string; dto: ApiTokenDto }> {
	assertCan(actor.role, 'token.manage_own');
	initModels();
	const { token, prefix } = generateToken();
	const expires = input.lifetimeDays ? new Date(now.getTime() + input.lifetimeDays * 86_400_000) : null;
	return sequelize().transaction(async (tx) => {
		const row = await ApiToken.create(
			{ user_id: actor.id, name: input.name, token_hash: hashToken(token), prefix, expires_at: expires, last_used_at: null, revoked_at: null },
			{ transaction: tx }
		);
		const dto = toDto(row, now);
		await recordAudit(tx, {
			actor,
			action: 'api_token.create',
			entityType: 'api_token',
			entityId: dto.id,
			after: { name: dto.name, prefix: dto.prefix, expiresAt: dto.expiresAt, userId: actor.id },
			ip
		});
		return { token, dto };
	});
}

/** The actor's own tokens, newest first. */
export async function listApiTokens(actor: SessionUser, now = new Date()): Promise<ApiTokenDto[]> {
	assertCan(actor.role, 'token.manage_own');
	initModels();
	const rows = await ApiToken.findAll({ where: { user_id: actor.id }, order: [['id', 'DESC']] });
	return rows.map((r) => toDto(r, now));
}

/** Revoke one of the actor's own tokens (idempotent for an already revoked one). */
export async function revokeApiToken(actor: SessionUser, tokenId: number, ip: string | null = null): Promise<ApiTokenDto> {
	assertCan(actor.role, 'token.manage_own');
	initModels();
	return sequelize().transaction(async (tx) => {
		const row = await ApiToken.findOne({ where: { id: tokenId, user_id: actor.id }, transaction: tx, lock: tx.LOCK.UPDATE });
		if (!row) throw new NotFound('No such token among yours.');
		if (row.revoked_at) return toDto(row);
		const before = toDto(row);
		row.revoked_at = new Date();
		await row.save({ transaction: tx });
		const after = toDto(row);
		await recordAudit(tx, { actor, action: 'api_token.revoke', entityType: 'api_token', entityId: after.id, before, after, ip });
		return after;
	});
}

/**
 * The person a bearer token acts for, with their current role, or null when the token is
 * malformed, unknown, revoked, expired, or its owner is deactivated.
 */
export async function userForToken(token: string, now = new Date()): Promise<SessionUser | null> {
	if (!TOKEN_PATTERN.test(token)) return null;
	initModels();
	const hash = hashToken(token);
	const row = await ApiToken.findOne({
		where: {
			token_hash: hash,
			revoked_at: null,
			[Op.or]: [{ expires_at: null }, { expires_at: { [Op.gt]: now } }]
		}
	});
	if (!row) return null;
	// The lookup is by hash already; compare again in constant time as a belt-and-braces check.
	if (!timingSafeEqual(Buffer.from(row.token_hash, 'utf8'), Buffer.from(hash, 'utf8'))) return null;
	const user = await sessionUser(row.user_id);
	if (!user) return null;
	const last = row.last_used_at ? new Date(row.last_used_at).getTime() : 0;
	if (now.getTime() - last > LAST_USED_RESOLUTION_MS) {
		await ApiToken.update({ last_used_at: now }, { where: { id: row.id } });
	}
	return user;
}
