/**
 * A die's surface zones, kept by the toolroom lead (one half each), and the repairs a toolroom job
 * made to them. Inspections pick a zone from this list, so a zone's crack series never splits over
 * spellings; a repair of the zone restarts its series (calc/crack-trend `splitCrackSeries`).
 */
import type { RepairKind } from '../../domain';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';
import { TOOLROOM_LEADS } from './access';
import type { Actor } from './jobs';

export interface DieZone {
	id: number;
	half: 'cover' | 'ejector';
	name: string;
}

/** The die's active zones, by half and name. */
export async function listDieZones(db: DB, dieId: number): Promise<DieZone[]> {
	return db
		.selectFrom('die_zones')
		.select(['id', 'half', 'name'])
		.where('die_id', '=', dieId)
		.where('active', '=', 1)
		.orderBy('half')
		.orderBy('name')
		.execute();
}

const sameName = (a: string, b: string) => a.trim().toLowerCase() === b.trim().toLowerCase();

/** The listed zone of that half and name (trimmed, case-blind); undefined when not listed. */
export async function findDieZone(db: DB, dieId: number, half: string, name: string) {
	return (await listDieZones(db, dieId)).find((z) => z.half === half && sameName(z.name, name));
}

/** Adds a zone to the die's list; only the toolroom lead (or admin) keeps the list. */
export async function addDieZone(
	db: DB,
	dieId: number,
	zone: { half: 'cover' | 'ejector'; name: string },
	actor: Actor,
	at = nowIso()
): Promise<{ ok: true; id: number } | { ok: false; status: 403 | 409; message: string }> {
	if (!TOOLROOM_LEADS.includes(actor.role)) {
		return { ok: false, status: 403, message: 'Only the toolroom lead keeps the zone list.' };
	}
	const name = zone.name.trim();
	if (await findDieZone(db, dieId, zone.half, name)) {
		return {
			ok: false,
			status: 409,
			message: `The ${zone.half} half already has a zone “${name}”.`
		};
	}
	const row = await writeTransaction(db, async (trx) => {
		const inserted = await trx
			.insertInto('die_zones')
			.values({ die_id: dieId, half: zone.half, name, active: 1, created_at: at })
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{ userId: actor.userId, action: 'zone.add', dieId, detail: { half: zone.half, name } },
			at
		);
		return inserted;
	});
	return { ok: true, id: row.id };
}

/**
 * Records that a toolroom job repaired zones of its die (weld, insert change, re-machining). The
 * zone's crack series restarts after the job closes. Zones must be the die's own.
 */
export async function recordJobRepairs(
	db: DB,
	jobId: number,
	repairs: { zoneId: number; kind: RepairKind }[],
	actor: Actor,
	at = nowIso()
): Promise<{ ok: true } | { ok: false; status: 400 | 404; message: string }> {
	const job = await db
		.selectFrom('toolroom_jobs')
		.select(['id', 'die_id', 'number'])
		.where('id', '=', jobId)
		.executeTakeFirst();
	if (!job) return { ok: false, status: 404, message: 'There is no such job.' };
	const zones = await listDieZones(db, job.die_id);
	for (const r of repairs) {
		if (!zones.some((z) => z.id === r.zoneId)) {
			return { ok: false, status: 400, message: 'Pick zones from the die’s own zone list.' };
		}
	}
	await writeTransaction(db, async (trx) => {
		for (const r of repairs) {
			await trx
				.insertInto('job_repairs')
				.values({ job_id: jobId, zone_id: r.zoneId, kind: r.kind })
				.onConflict((oc) => oc.columns(['job_id', 'zone_id']).doUpdateSet({ kind: r.kind }))
				.execute();
		}
		await writeAudit(
			trx,
			{
				userId: actor.userId,
				action: 'job.repairs',
				dieId: job.die_id,
				detail: { job: job.number, repairs }
			},
			at
		);
	});
	return { ok: true };
}

/** Repairs of the die's zones by closed (done) jobs, with when the job closed. */
export async function listZoneRepairs(db: DB, dieId: number) {
	return db
		.selectFrom('job_repairs as r')
		.innerJoin('toolroom_jobs as j', 'j.id', 'r.job_id')
		.select([
			'r.zone_id as zoneId',
			'r.kind',
			'j.number',
			'j.closed_at as closedAt',
			'j.die_shots_at_close as shots'
		])
		.where('j.die_id', '=', dieId)
		.where('j.status', '=', 'done')
		.where('j.closed_at', 'is not', null)
		.execute();
}

/** The zones a job repaired, with how, by half and zone name. */
export async function listJobRepairs(db: DB, jobId: number) {
	return db
		.selectFrom('job_repairs as r')
		.innerJoin('die_zones as z', 'z.id', 'r.zone_id')
		.select(['r.id', 'r.kind', 'z.half', 'z.name as zone'])
		.where('r.job_id', '=', jobId)
		.orderBy('z.half')
		.orderBy('z.name')
		.execute();
}
