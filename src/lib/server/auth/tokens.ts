import { createHash, randomBytes } from 'node:crypto';
import type { DB } from '../db/connect';
import { API_SCOPES, type ApiScope } from '../../roles';
import { nowIso } from '../time';

const TOKEN_PREFIX = 'cst_';

// Tokens carry 256 random bits, so a fast hash is enough at rest (no salt or slow hash needed:
// nothing to brute-force), and lookup by hash stays an index seek.
export function hashToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

export interface NewTokenInput {
	name: string;
	scopes: ApiScope[];
	customerId: number | null;
	createdBy: string | null;
	/** The token stops working at this instant (ISO); null = never. */
	expiresAt?: string | null;
}

/** Creates a token and returns its secret; only the hash is stored, so this is the one chance to see it. */
export async function createApiToken(
	db: DB,
	input: NewTokenInput
): Promise<{ id: number; token: string }> {
	const scopes = [...new Set(input.scopes)].filter((s) => API_SCOPES.includes(s));
	if (scopes.length === 0) throw new Error('A token needs at least one scope.');
	const token = TOKEN_PREFIX + randomBytes(32).toString('base64url');
	const row = await db
		.insertInto('api_tokens')
		.values({
			name: input.name,
			token_hash: hashToken(token),
			token_prefix: token.slice(0, 10),
			scopes: scopes.join(','),
			customer_id: input.customerId,
			created_by: input.createdBy,
			expires_at: input.expiresAt ?? null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return { id: row.id, token };
}

/**
 * The instant a token made today stops working: the end (UTC) of the last day given, null for no
 * expiry, 'invalid' for a day that does not exist, is not after today or is over five years away.
 */
export function tokenExpiry(lastDay: string, now: string): string | null | 'invalid' {
	if (!lastDay) return null;
	const start = new Date(`${lastDay}T00:00:00.000Z`);
	if (Number.isNaN(start.getTime()) || start.toISOString().slice(0, 10) !== lastDay)
		return 'invalid';
	const today = now.slice(0, 10);
	const limit = `${Number(today.slice(0, 4)) + 5}${today.slice(4)}`;
	if (lastDay <= today || lastDay > limit) return 'invalid';
	return new Date(start.getTime() + 86_400_000).toISOString();
}

export interface TokenPrincipal {
	tokenId: number;
	name: string;
	scopes: ApiScope[];
	customerId: number | null;
}

/** The live token for a bearer secret, or null when unknown or revoked. */
export async function findActiveToken(db: DB, token: string): Promise<TokenPrincipal | null> {
	const row = await db
		.selectFrom('api_tokens')
		.select(['id', 'name', 'scopes', 'customer_id', 'revoked_at', 'last_used_at', 'expires_at'])
		.where('token_hash', '=', hashToken(token))
		.executeTakeFirst();
	if (!row || row.revoked_at) return null;
	const now = nowIso();
	if (row.expires_at && row.expires_at <= now) return null;
	// Touch last-used at most once a minute so a busy press feed does not write on every call.
	if (!row.last_used_at || Date.parse(now) - Date.parse(row.last_used_at) > 60_000) {
		await db
			.updateTable('api_tokens')
			.set({ last_used_at: now })
			.where('id', '=', row.id)
			.execute();
	}
	return {
		tokenId: row.id,
		name: row.name,
		scopes: row.scopes.split(',') as ApiScope[],
		customerId: row.customer_id
	};
}

export async function listApiTokens(db: DB, customerId?: number) {
	let q = db
		.selectFrom('api_tokens')
		.leftJoin('customers', 'customers.id', 'api_tokens.customer_id')
		.select([
			'api_tokens.id',
			'api_tokens.name',
			'api_tokens.token_prefix',
			'api_tokens.scopes',
			'api_tokens.created_at',
			'api_tokens.last_used_at',
			'api_tokens.revoked_at',
			'api_tokens.expires_at',
			'customers.code as customerCode',
			'customers.name as customerName'
		])
		.orderBy('api_tokens.id', 'desc');
	if (customerId !== undefined) q = q.where('api_tokens.customer_id', '=', customerId);
	return q.execute();
}

export async function revokeApiToken(db: DB, id: number): Promise<boolean> {
	const res = await db
		.updateTable('api_tokens')
		.set({ revoked_at: nowIso() })
		.where('id', '=', id)
		.where('revoked_at', 'is', null)
		.executeTakeFirst();
	return Number(res.numUpdatedRows) === 1;
}
