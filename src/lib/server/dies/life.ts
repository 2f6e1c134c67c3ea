import { sql, type RawBuilder } from 'kysely';
import { lifeStatus, type LifeStatus } from '../../calc/life';
import type { DB } from '../db/connect';
import type { HalfSide } from '../db/schema';
import { trailingShotsPerDay } from '../schedule/die-facts';

// "Life follows the steel": a die's life used, shots to end of life and projected end of life are
// those of its most-worn ACTIVE half, where a half's expected life is its own when set, else the
// die's (else the alloy's). A die with no half on record falls back to its own total. This file
// is the one definition: the SQL below picks the half, `dieLifeOf` turns the pick into figures,
// and every page, export, API, notice and statement goes through one of them.

/** A half's expected life in SQL: its own, else the die's, else the alloy's (needs `dies`, `alloys`). */
const halfExpected = sql`coalesce(h.expected_life_shots, dies.expected_life_shots, alloys.expected_life_shots)`;
// Nulls last as SQLite sorts them descending; PostgreSQL would put them first.
const mostWorn = (column: RawBuilder<unknown>) =>
	sql`(select ${column} from die_halves h where h.die_id = dies.id and h.active = 1
	      order by h.shots * 1.0 / nullif(${halfExpected}, 0) desc nulls last, h.shots desc, h.id
	      limit 1)`;

/** Shots on the most-worn active half (the die total when it has no half); needs `dies` + `alloys`. */
export const lifeShotsSql = sql<number>`coalesce(${mostWorn(sql`h.shots`)}, dies.total_shots)`;
/** Expected life of that same half, shots; needs `dies` and `alloys` in the query. */
export const lifeExpectedSql = sql<number>`coalesce(${mostWorn(halfExpected)}, dies.expected_life_shots, alloys.expected_life_shots)`;
/** Side of the most-worn active half, or null; needs `dies` and `alloys` in the query. */
export const lifeSideSql = sql<HalfSide | null>`${mostWorn(sql`h.side`)}`;
/** Life used as a fraction, for sorting and thresholds in SQL (same pick as above). */
// A zero expected life gives null on both engines (PostgreSQL would otherwise stop on x / 0).
export const lifeUsedRatioSql = sql<number>`(${lifeShotsSql} * 1.0 / nullif(${lifeExpectedSql}, 0))`;

/** What the life of a die is measured on: the most-worn active half's shots and expected life. */
export interface LifeBasis {
	lifeShots: number;
	lifeExpectedShots: number;
	/** The half that sets the die's life, or null when the die has no half on record. */
	lifeSide: HalfSide | null;
}

export interface DieLife extends LifeStatus, LifeBasis {}

/**
 * The die's life figures from its basis and the die's trailing shot rate (shots per day): life
 * used %, shots remaining and projected end of life of the most-worn active half (calc/life).
 * The rate is the die's, since every shot the die takes lands on each active half.
 */
export function dieLifeOf(basis: LifeBasis, shotsPerDay: number, asOf: string): DieLife {
	const windowShots = shotsPerDay * 28;
	return {
		...basis,
		...lifeStatus({
			totalShots: basis.lifeShots,
			expectedLifeShots: basis.lifeExpectedShots,
			recentShots: windowShots > 0 ? [{ at: asOf, shots: windowShots }] : [],
			asOf
		})
	};
}

/** Life used %, when only the share is wanted (lists, thresholds). */
export function lifeUsedPctOf(basis: Pick<LifeBasis, 'lifeShots' | 'lifeExpectedShots'>): number {
	return (100 * basis.lifeShots) / basis.lifeExpectedShots;
}

/** Life bases of many dies in one query. */
export async function loadLifeBases(
	db: DB,
	dieIds: readonly number[]
): Promise<Map<number, LifeBasis>> {
	const result = new Map<number, LifeBasis>();
	if (dieIds.length === 0) return result;
	const rows = await db
		.selectFrom('dies')
		.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
		.select([
			'dies.id',
			lifeShotsSql.as('lifeShots'),
			lifeExpectedSql.as('lifeExpectedShots'),
			lifeSideSql.as('lifeSide')
		])
		.where('dies.id', 'in', [...new Set(dieIds)])
		.execute();
	for (const r of rows) {
		result.set(r.id, {
			lifeShots: Number(r.lifeShots),
			lifeExpectedShots: Number(r.lifeExpectedShots),
			lifeSide: r.lifeSide
		});
	}
	return result;
}

/**
 * The life of many dies at once (basis + trailing rate in a few queries), by die id. This is the
 * function every surface calls for a die's life used, shots remaining and projected end of life.
 */
export async function loadDieLives(
	db: DB,
	dieIds: readonly number[],
	asOf: string
): Promise<Map<number, DieLife>> {
	const bases = await loadLifeBases(db, dieIds);
	const rates = await trailingShotsPerDay(
		db,
		[...bases].map(([id, b]) => ({
			id,
			totalShots: b.lifeShots,
			expectedLifeShots: b.lifeExpectedShots
		})),
		asOf
	);
	const result = new Map<number, DieLife>();
	for (const [id, basis] of bases) result.set(id, dieLifeOf(basis, rates.get(id) ?? 0, asOf));
	return result;
}

/** The life of one die (see loadDieLives). */
export async function loadDieLife(db: DB, dieId: number, asOf: string): Promise<DieLife> {
	const life = (await loadDieLives(db, [dieId], asOf)).get(dieId);
	if (!life) throw new Error(`No die with id ${dieId}.`);
	return life;
}

export interface HalfLife {
	id: number;
	side: HalfSide;
	serial: string;
	steel: string | null;
	hardnessHrc: number | null;
	installedAt: string;
	removedAt: string | null;
	removalReason: string | null;
	/** The die's total when the half went in (0 for the originals). */
	dieShotsAtInstall: number;
	active: boolean;
	shots: number;
	/** The half's own expected life when set, else the die's. */
	expectedLifeShots: number;
	ownExpectedLife: boolean;
	lifeUsedPct: number;
	/** True for the half that sets the die's life. */
	setsDieLife: boolean;
}

/** Every half a die has had with its shots and life used; current halves first. */
export async function listHalfLives(db: DB, dieId: number): Promise<HalfLife[]> {
	const [halves, bases] = await Promise.all([
		db
			.selectFrom('die_halves')
			.innerJoin('dies', 'dies.id', 'die_halves.die_id')
			.innerJoin('alloys', 'alloys.id', 'dies.alloy_id')
			.select([
				'die_halves.id',
				'die_halves.side',
				'die_halves.serial',
				'die_halves.steel',
				'die_halves.hardness_hrc',
				'die_halves.installed_at',
				'die_halves.removed_at',
				'die_halves.removal_reason',
				'die_halves.die_shots_at_install',
				'die_halves.active',
				'die_halves.shots',
				'die_halves.expected_life_shots as own',
				sql<number>`coalesce(die_halves.expected_life_shots, dies.expected_life_shots, alloys.expected_life_shots)`.as(
					'expected'
				)
			])
			.where('die_halves.die_id', '=', dieId)
			.orderBy('die_halves.active', 'desc')
			.orderBy('die_halves.side')
			.orderBy('die_halves.installed_at', 'desc')
			.orderBy('die_halves.id', 'desc')
			.execute(),
		loadLifeBases(db, [dieId])
	]);
	const basis = bases.get(dieId);
	let marked = false;
	return halves.map((h) => {
		const lifeUsedPct = lifeUsedPctOf({ lifeShots: h.shots, lifeExpectedShots: h.expected });
		const setsDieLife =
			!marked && h.active === 1 && basis?.lifeSide === h.side && basis.lifeShots === h.shots;
		if (setsDieLife) marked = true;
		return {
			id: h.id,
			side: h.side,
			serial: h.serial,
			steel: h.steel,
			hardnessHrc: h.hardness_hrc,
			installedAt: h.installed_at,
			removedAt: h.removed_at,
			removalReason: h.removal_reason,
			dieShotsAtInstall: h.die_shots_at_install,
			active: h.active === 1,
			shots: h.shots,
			expectedLifeShots: h.expected,
			ownExpectedLife: h.own !== null,
			lifeUsedPct,
			setsDieLife
		};
	});
}
