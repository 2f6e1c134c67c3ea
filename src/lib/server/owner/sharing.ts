/**
 * What the plant shares with a die's owner: each toolroom job's owner summary (written for the
 * owner, shown only when marked shared) and each photo's shared flag. Every change is audited on
 * the die. Jobs and photos are looked up within the die, so a form cannot reach another die's.
 */
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import { nowIso } from '../time';

/** The die's jobs (cancelled ones too, greyed) and photos with their sharing state. */
export async function listSharing(db: DB, dieId: number) {
	const [jobs, photos] = await Promise.all([
		db
			.selectFrom('toolroom_jobs')
			.select([
				'id',
				'number',
				'kind',
				'status',
				'description',
				'opened_at as openedAt',
				'closed_at as closedAt',
				'billable_to_owner as billable',
				'owner_summary as ownerSummary',
				'summary_shared as shared'
			])
			.where('die_id', '=', dieId)
			.orderBy('opened_at', 'desc')
			.orderBy('id', 'desc')
			.execute(),
		db
			.selectFrom('photos')
			.leftJoin('toolroom_jobs', 'toolroom_jobs.id', 'photos.job_id')
			.select([
				'photos.public_id as publicId',
				'photos.caption',
				'photos.uploaded_at as uploadedAt',
				'photos.shared_with_owner as shared',
				'photos.inspection_id as inspectionId',
				'toolroom_jobs.number as jobNumber'
			])
			.where('photos.die_id', '=', dieId)
			.orderBy('photos.uploaded_at', 'desc')
			.orderBy('photos.id', 'desc')
			.execute()
	]);
	return { jobs, photos };
}

export type SharingResult =
	{ ok: true; message: string } | { ok: false; status: 400 | 404; message: string };

/** Sets a job's owner summary and whether the owner sees it; a blank summary cannot be shared. */
export async function setJobSharing(
	db: DB,
	input: {
		dieId: number;
		jobNumber: string;
		ownerSummary: string;
		shared: boolean;
		actorId: string;
	},
	at = nowIso()
): Promise<SharingResult> {
	const summary = input.ownerSummary.trim();
	if (input.shared && !summary) {
		return {
			ok: false,
			status: 400,
			message: 'Write the summary for the owner before sharing it.'
		};
	}
	return writeTransaction(db, async (trx) => {
		const job = await trx
			.selectFrom('toolroom_jobs')
			.select(['id', 'number', 'owner_summary', 'summary_shared'])
			.where('number', '=', input.jobNumber.toUpperCase())
			.where('die_id', '=', input.dieId)
			.executeTakeFirst();
		if (!job)
			return {
				ok: false,
				status: 404,
				message: `This die has no job ${input.jobNumber}.`
			} as const;
		await trx
			.updateTable('toolroom_jobs')
			.set({ owner_summary: summary || null, summary_shared: input.shared ? 1 : 0, updated_at: at })
			.where('id', '=', job.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actorId,
				action: 'job.owner_summary',
				dieId: input.dieId,
				detail: {
					job: job.number,
					shared: input.shared,
					summaryChanged: (job.owner_summary ?? '') !== summary
				}
			},
			at
		);
		const message = input.shared
			? `${job.number}: the summary is shared with the owner.`
			: `${job.number}: the summary is saved and not shared.`;
		return { ok: true, message } as const;
	});
}

/** Shows a photo to the owner or hides it again. */
export async function setPhotoSharing(
	db: DB,
	input: { dieId: number; publicId: string; shared: boolean; actorId: string },
	at = nowIso()
): Promise<SharingResult> {
	return writeTransaction(db, async (trx) => {
		const photo = await trx
			.selectFrom('photos')
			.select(['id'])
			.where('public_id', '=', input.publicId)
			.where('die_id', '=', input.dieId)
			.executeTakeFirst();
		if (!photo) return { ok: false, status: 404, message: 'This die has no such photo.' } as const;
		await trx
			.updateTable('photos')
			.set({ shared_with_owner: input.shared ? 1 : 0 })
			.where('id', '=', photo.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actorId,
				action: 'photo.share',
				dieId: input.dieId,
				detail: { photo: input.publicId, shared: input.shared }
			},
			at
		);
		const message = input.shared
			? 'The photo is shared with the owner.'
			: 'The photo is hidden from the owner.';
		return { ok: true, message } as const;
	});
}
