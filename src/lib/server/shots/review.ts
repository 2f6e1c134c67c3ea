import { sql } from 'kysely';
import type { DB } from '../db/connect';

/** Entries waiting for review (accepted through the API with warnings), per die id. */
export async function countToReview(
	db: DB,
	dieIds: readonly number[]
): Promise<Map<number, number>> {
	const result = new Map<number, number>();
	if (dieIds.length === 0) return result;
	const rows = await db
		.selectFrom('shot_entries')
		.select(['die_id', sql<number>`count(*)`.as('n')])
		.where('review_state', '=', 'to_review')
		.where('voided_at', 'is', null)
		.where('die_id', 'in', [...new Set(dieIds)])
		.groupBy('die_id')
		.execute();
	for (const r of rows) result.set(r.die_id, Number(r.n));
	return result;
}

/** Every entry waiting for review across the plant, oldest first (the toolroom lead's list). */
export async function listEntriesToReview(db: DB, limit = 50) {
	return db
		.selectFrom('shot_entries')
		.innerJoin('dies', 'dies.id', 'shot_entries.die_id')
		.leftJoin('machines', 'machines.id', 'shot_entries.machine_id')
		.leftJoin('api_tokens', 'api_tokens.id', 'shot_entries.token_id')
		.leftJoin('users', 'users.id', 'shot_entries.entered_by')
		.select([
			'shot_entries.id',
			'dies.number as dieNumber',
			'shot_entries.counted_at as countedAt',
			'shot_entries.shots',
			'shot_entries.warning',
			'machines.name as press',
			sql<string | null>`coalesce(users.name, api_tokens.name)`.as('enteredBy')
		])
		.where('shot_entries.review_state', '=', 'to_review')
		.where('shot_entries.voided_at', 'is', null)
		.orderBy('shot_entries.counted_at')
		.limit(limit)
		.execute();
}
