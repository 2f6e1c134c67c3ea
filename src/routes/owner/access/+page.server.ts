import { listApiTokens } from '$lib/server/auth/tokens';
import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import type { PageServerLoad } from './$types';

// Which API tokens the plant issued for this customer: names and prefixes, never the secrets
// (they are not stored; only their hashes are, and those are not selected either).
export const load: PageServerLoad = async (event) => {
	const { customerId } = requireOwner(event);
	const tokens = await listApiTokens(getDb(), customerId);
	return {
		tokens: tokens.map((t) => ({
			name: t.name,
			prefix: t.token_prefix,
			scopes: t.scopes.split(','),
			createdAt: t.created_at,
			lastUsedAt: t.last_used_at,
			revokedAt: t.revoked_at
		}))
	};
};
