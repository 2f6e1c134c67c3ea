import { sql } from 'kysely';
import { lifeExpectedSql, lifeShotsSql, lifeUsedPctOf } from '../dies/life';
import type { DB } from '../db/connect';
import type { DieStatus } from '../db/schema';

export interface DieShotSummary {
	number: string;
	partName: string;
	status: DieStatus;
	totalShots: number;
	expectedLifeShots: number;
	lifeUsedPct: number;
	lastCountedAt: string | null;
	/** The last counter end reading on this die, to start the next run from. */
	lastCounterEnd: number | null;
	lastPress: string | null;
}

/**
 * What the press-run form shows about a die before saving: its total and life used, and where
 * the last counter reading left off. Plant roles only (no customer scope here).
 */
export async function findDieShotSummary(db: DB, number: string): Promise<DieShotSummary | null> {
	const die = await db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select([
			'dies.id',
			'dies.number',
			'dies.part_name as partName',
			'dies.status',
			'dies.total_shots as totalShots',
			'dies.last_counted_at as lastCountedAt',
			sql<number>`coalesce(dies.expected_life_shots, alloys.expected_life_shots)`.as(
				'expectedLifeShots'
			),
			lifeShotsSql.as('lifeShots'),
			lifeExpectedSql.as('lifeExpectedShots')
		])
		.where('dies.number', '=', number.trim().toUpperCase())
		.executeTakeFirst();
	if (!die) return null;
	// Latest reading first on the (die_id, counted_at) index; stops at the first counter reading.
	const [counter, press] = await Promise.all([
		db
			.selectFrom('shot_entries')
			.select('counter_end')
			.where('die_id', '=', die.id)
			.where('counter_end', 'is not', null)
			.where('voided_at', 'is', null)
			.orderBy('counted_at', 'desc')
			.limit(1)
			.executeTakeFirst(),
		db
			.selectFrom('machines')
			.select('name')
			.where(
				'id',
				'=',
				db
					.selectFrom('shot_entries')
					.select('machine_id')
					.where('die_id', '=', die.id)
					.where('machine_id', 'is not', null)
					.orderBy('counted_at', 'desc')
					.limit(1)
			)
			.executeTakeFirst()
	]);
	return {
		number: die.number,
		partName: die.partName,
		status: die.status,
		totalShots: die.totalShots,
		expectedLifeShots: die.expectedLifeShots,
		lifeUsedPct: lifeUsedPctOf(die),
		lastCountedAt: die.lastCountedAt,
		lastCounterEnd: counter?.counter_end ?? null,
		lastPress: press?.name ?? null
	};
}
