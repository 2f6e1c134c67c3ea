import type { DB } from '../db/connect';

// The toolroom area owns `toolroom_jobs`; the schedule only reads open jobs.

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

/** Open toolroom jobs, optionally of some dies only. */
export async function listOpenToolroomJobs(db: DB, dieIds?: readonly number[]): Promise<OpenJob[]> {
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
