import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { diesNearEndOfLife, fleetCounts, listServiceAttention } from '$lib/server/dies/attention';
import { outboxHealth } from '$lib/server/notices/admin';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const db = getDb();
	const [counts, nearEnd, attention, users, tokens, outbox] = await Promise.all([
		fleetCounts(db),
		diesNearEndOfLife(db, 90),
		listServiceAttention(db),
		db
			.selectFrom('users')
			.select((eb) => eb.fn.countAll<number>().as('n'))
			.where('active', '=', 1)
			.executeTakeFirstOrThrow(),
		db
			.selectFrom('api_tokens')
			.select((eb) => eb.fn.countAll<number>().as('n'))
			.where('revoked_at', 'is', null)
			.executeTakeFirstOrThrow(),
		outboxHealth(db)
	]);
	return {
		counts,
		nearEnd: nearEnd.slice(0, 20),
		overdue: attention.filter((a) => a.state === 'overdue').length,
		due: attention.filter((a) => a.state === 'due').length,
		activeUsers: Number(users.n),
		activeTokens: Number(tokens.n),
		outbox
	};
};
