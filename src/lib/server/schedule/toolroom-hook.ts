import { sql } from 'kysely';
import type { DB } from '../db/connect';

// The toolroom area owns `toolroom_jobs`. The schedule only reads open jobs, and only when the
// table is there, so the board keeps working on a database migrated before the toolroom area.

const OPEN_STATUSES = ['open', 'in_progress', 'waiting_parts'] as const;

export interface OpenJob {
	dieId: number;
	number: string;
	kind: string;
	status: string;
	openedAt: string;
	description: string;
	/** True while the job keeps the die in the toolroom. */
	holdsDie: boolean;
	/** When the toolroom expects to release the die; null when not said. */
	expectedReleaseAt: string | null;
	/** True once the plant shared the job with the die's owner. */
	shared: boolean;
}

const known = new WeakMap<object, boolean>();

/** Whether the toolroom jobs table exists (asked once per database handle). */
export async function hasToolroomJobs(db: DB): Promise<boolean> {
	const cached = known.get(db);
	if (cached !== undefined) return cached;
	const row = await sql<{ n: number }>`select count(*) as n from sqlite_master
		where type = 'table' and name = 'toolroom_jobs'`.execute(db);
	const exists = Number(row.rows[0]?.n ?? 0) > 0;
	known.set(db, exists);
	return exists;
}

/** Open toolroom jobs, optionally of some dies only; empty when the table is not there. */
export async function listOpenToolroomJobs(db: DB, dieIds?: readonly number[]): Promise<OpenJob[]> {
	if (!(await hasToolroomJobs(db))) return [];
	if (dieIds && dieIds.length === 0) return [];
	const rows = await db
		.selectFrom('toolroom_jobs')
		.select([
			'die_id',
			'number',
			'kind',
			'status',
			'opened_at',
			'description',
			'die_to_toolroom',
			'expected_release_at',
			'summary_shared'
		])
		.where('status', 'in', [...OPEN_STATUSES])
		.$if(dieIds !== undefined, (q) => q.where('die_id', 'in', [...dieIds!]))
		.orderBy('opened_at')
		.execute();
	return rows.map((r) => ({
		dieId: r.die_id,
		number: r.number,
		kind: r.kind,
		status: r.status,
		openedAt: r.opened_at,
		description: r.description,
		holdsDie: r.die_to_toolroom === 1,
		expectedReleaseAt: r.expected_release_at,
		shared: r.summary_shared === 1
	}));
}
