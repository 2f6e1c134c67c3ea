/**
 * Photos of toolroom jobs and surface inspections: the upload handler (check every file, keep
 * processed JPEGs only, rows and files all or nothing), lists, sharing with the owner, and the
 * access rule of the photo route.
 */
import { randomBytes } from 'node:crypto';
import { MAX_PHOTOS_PER_UPLOAD } from '../../schemas/toolroom';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { PhotoStage } from '../db/schema-toolroom';
import {
	checkPhotos,
	storePhotoFilesWith,
	type PhotoProblem,
	type StoredPhotoFiles,
	type UploadedFile
} from '../photos/store';
import type { PhotoStore } from '../photos/photo-store';
import { nowIso } from '../time';
import { canWorkToolroom } from './access';
import type { Actor } from './jobs';

export type PhotoTarget = { jobId: number } | { inspectionId: number };

export type UploadResult =
	/** At least one photo landed; `problems` names each file that did not, with its reason. */
	| { ok: true; count: number; message: string; problems: PhotoProblem[] }
	| { ok: false; status: 400 | 403 | 404 | 409; message: string; problems: PhotoProblem[] };

/** Random, URL-safe and not guessable: photo addresses must not be found by counting. */
export function newPublicId(): string {
	return randomBytes(16).toString('base64url');
}

/** Inserts the rows of stored photo files; call inside the transaction of the owning record. */
export async function insertPhotoRows(
	trx: DB,
	files: StoredPhotoFiles[],
	owner: { jobId: number | null; inspectionId: number | null; dieId: number },
	actorId: string | null,
	at: string,
	caption: string | null = null,
	stage: PhotoStage | null = null
) {
	if (files.length === 0) return;
	// One caption sent with several files (a form without JavaScript) is kept on each, marked as
	// typed once for the upload, so nobody reads it as that photo's own words.
	const captionBatch = caption === null ? 1 : files.length;
	await trx
		.insertInto('photos')
		.values(
			files.map((f) => ({
				public_id: newPublicId(),
				job_id: owner.jobId,
				inspection_id: owner.inspectionId,
				die_id: owner.dieId,
				full_file: f.fullFile,
				thumb_file: f.thumbFile,
				width: f.image.width,
				height: f.image.height,
				sha256: f.image.sha256,
				bytes: f.image.full.length,
				thumb_bytes: f.image.thumb.length,
				source_type: f.image.sourceType,
				uploaded_by: actorId,
				uploaded_at: at,
				caption,
				caption_batch: captionBatch,
				stage
			}))
		)
		.execute();
}

async function findTarget(db: DB, target: PhotoTarget) {
	if ('jobId' in target) {
		const job = await db
			.selectFrom('toolroom_jobs')
			.select(['id', 'number', 'die_id', 'status'])
			.where('id', '=', target.jobId)
			.executeTakeFirst();
		return job && { dieId: job.die_id, label: job.number, cancelled: job.status === 'cancelled' };
	}
	const inspection = await db
		.selectFrom('surface_inspections')
		.select(['id', 'die_id'])
		.where('id', '=', target.inspectionId)
		.executeTakeFirst();
	return (
		inspection && {
			dieId: inspection.die_id,
			label: `inspection ${inspection.id}`,
			cancelled: false
		}
	);
}

/**
 * The upload handler: adds up to MAX_PHOTOS_PER_UPLOAD photos to a job or an inspection. Every
 * file is checked by content and processed on its own: the good ones are written and their rows
 * inserted (one transaction, files removed again if it fails), each bad one is reported by its
 * file name, so one bad photo never costs the others. `stage` tags job photos before / during /
 * after the work.
 */
export async function uploadPhotos(
	db: DB,
	input: {
		target: PhotoTarget;
		files: UploadedFile[];
		actor: Actor;
		photoStore: PhotoStore;
		caption?: string | null;
		stage?: PhotoStage | null;
		at?: string;
	}
): Promise<UploadResult> {
	const at = input.at ?? nowIso();
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not add photos.', problems: [] };
	}
	const target = await findTarget(db, input.target);
	if (!target)
		return { ok: false, status: 404, message: 'That record does not exist.', problems: [] };
	if (target.cancelled) {
		return {
			ok: false,
			status: 409,
			message: `${target.label} is cancelled; photos cannot be added.`,
			problems: []
		};
	}
	const checked = await checkPhotos(input.files, MAX_PHOTOS_PER_UPLOAD);
	if (!checked.ok) {
		return { ok: false, status: 400, message: checked.message, problems: checked.problems };
	}
	const { problems } = checked;
	if (checked.images.length === 0) {
		const message =
			problems.length === 1 ? 'The photo was not saved.' : 'None of the photos could be saved.';
		return { ok: false, status: 400, message, problems };
	}
	const stage = 'jobId' in input.target ? (input.stage ?? null) : null;
	const caption = input.caption?.trim() ? input.caption.trim().slice(0, 200) : null;
	const images = checked.images.map((i) => i.image);
	await storePhotoFilesWith(input.photoStore, images, (files) =>
		db.transaction().execute(async (trx) => {
			await insertPhotoRows(
				trx,
				files,
				{
					jobId: 'jobId' in input.target ? input.target.jobId : null,
					inspectionId: 'inspectionId' in input.target ? input.target.inspectionId : null,
					dieId: target.dieId
				},
				input.actor.userId,
				at,
				caption,
				stage
			);
			await writeAudit(
				trx,
				{
					userId: input.actor.userId,
					action: 'photo.add',
					dieId: target.dieId,
					detail: { to: target.label, count: files.length }
				},
				at
			);
		})
	);
	const count = images.length;
	const added = `${count} photo${count === 1 ? '' : 's'} added`;
	const message =
		problems.length === 0
			? `${added}.`
			: `${added}; ${problems.length} could not be used: ${problems.map((p) => p.file).join(', ')}.`;
	return { ok: true, count, message, problems };
}

const PHOTO_COLUMNS = [
	'p.public_id as publicId',
	'p.width',
	'p.height',
	'p.caption',
	'p.uploaded_at as uploadedAt',
	'p.shared_with_owner as shared',
	'p.stage',
	'u.name as uploadedBy'
] as const;

/** Photos of a job, oldest first. */
export async function listJobPhotos(db: DB, jobId: number) {
	return db
		.selectFrom('photos as p')
		.leftJoin('users as u', 'u.id', 'p.uploaded_by')
		.select(PHOTO_COLUMNS)
		.where('p.job_id', '=', jobId)
		.orderBy('p.id')
		.execute();
}

/** Photos of the given inspections, keyed by inspection id. */
export async function listInspectionPhotos(db: DB, inspectionIds: number[]) {
	const byInspection = new Map<number, Awaited<ReturnType<typeof listJobPhotos>>>();
	if (inspectionIds.length === 0) return byInspection;
	const rows = await db
		.selectFrom('photos as p')
		.leftJoin('users as u', 'u.id', 'p.uploaded_by')
		.select([...PHOTO_COLUMNS, 'p.inspection_id as inspectionId'])
		.where('p.inspection_id', 'in', inspectionIds)
		.orderBy('p.id')
		.execute();
	for (const { inspectionId, ...photo } of rows) {
		const list = byInspection.get(inspectionId!) ?? [];
		list.push(photo);
		byInspection.set(inspectionId!, list);
	}
	return byInspection;
}

/** Marks a photo shared with (or hidden from) the die's owner. */
export async function setPhotoShared(
	db: DB,
	input: { publicId: string; shared: boolean; actor: Actor; dieId?: number; at?: string }
): Promise<{ ok: true } | { ok: false; status: 403 | 404; message: string }> {
	if (!canWorkToolroom(input.actor.role)) {
		return { ok: false, status: 403, message: 'Your role may not share photos.' };
	}
	const at = input.at ?? nowIso();
	return writeTransaction(db, async (trx) => {
		const photo = await trx
			.selectFrom('photos')
			.select(['id', 'die_id'])
			.where('public_id', '=', input.publicId)
			.$if(input.dieId !== undefined, (q) => q.where('die_id', '=', input.dieId!))
			.executeTakeFirst();
		if (!photo) return { ok: false, status: 404, message: 'There is no such photo.' } as const;
		await trx
			.updateTable('photos')
			.set({ shared_with_owner: input.shared ? 1 : 0 })
			.where('id', '=', photo.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actor.userId,
				action: 'photo.share',
				dieId: photo.die_id,
				detail: { photo: input.publicId, shared: input.shared }
			},
			at
		);
		return { ok: true } as const;
	});
}

export interface PhotoViewer {
	role: string;
	customerId: number | null;
}

/**
 * Who may see a photo: plant roles every photo; a tooling owner only a photo marked shared on a
 * die it owns. The one rule for the photo files and the photo viewer page.
 */
function mayViewPhoto(photo: { shared: number; customerId: number }, viewer: PhotoViewer): boolean {
	if (viewer.role !== 'customer') return true;
	return !!photo.shared && viewer.customerId !== null && photo.customerId === viewer.customerId;
}

/**
 * The photo a viewer may see, or undefined (the route answers 404 either way): plant roles see
 * every photo; a tooling owner only a photo marked shared on a die it owns.
 */
export async function findViewablePhoto(db: DB, publicId: string, viewer: PhotoViewer) {
	const photo = await db
		.selectFrom('photos as p')
		.innerJoin('dies', 'dies.id', 'p.die_id')
		.select([
			'p.full_file as fullFile',
			'p.thumb_file as thumbFile',
			'p.sha256',
			'p.shared_with_owner as shared',
			'dies.customer_id as customerId'
		])
		.where('p.public_id', '=', publicId)
		.executeTakeFirst();
	if (!photo || !mayViewPhoto(photo, viewer)) return undefined;
	return photo;
}

/**
 * One photo in its context for the photo viewer: its own caption (and whether that caption was
 * typed once for several photos of one upload), date, die, job, before/after tag, and the zone
 * and half of the surface inspection it belongs to. Undefined when the viewer may not see it.
 */
export async function loadPhotoView(db: DB, publicId: string, viewer: PhotoViewer) {
	const photo = await db
		.selectFrom('photos as p')
		.innerJoin('dies', 'dies.id', 'p.die_id')
		.leftJoin('toolroom_jobs as j', 'j.id', 'p.job_id')
		.leftJoin('surface_inspections as s', 's.id', 'p.inspection_id')
		.select([
			'p.public_id as publicId',
			'p.caption',
			'p.caption_batch as captionBatch',
			'p.uploaded_at as uploadedAt',
			'p.width',
			'p.height',
			'p.stage',
			'p.shared_with_owner as shared',
			'dies.customer_id as customerId',
			'dies.number as dieNumber',
			'j.number as jobNumber',
			's.zone',
			's.half'
		])
		.where('p.public_id', '=', publicId)
		.executeTakeFirst();
	if (!photo || !mayViewPhoto(photo, viewer)) return undefined;
	const { customerId: _owner, shared: _shared, ...view } = photo;
	void _owner;
	void _shared;
	return view;
}

/**
 * Gives one photo its own caption (the plant's roles that share photos). Empty text removes the
 * caption. Audited on the photo's die; returns false when there is no such photo.
 */
export async function setPhotoCaption(
	db: DB,
	input: { publicId: string; caption: string; actorId: string; at?: string }
): Promise<boolean> {
	const at = input.at ?? nowIso();
	const caption = input.caption.trim() ? input.caption.trim().slice(0, 200) : null;
	return writeTransaction(db, async (trx) => {
		const photo = await trx
			.selectFrom('photos')
			.select(['id', 'die_id', 'caption'])
			.where('public_id', '=', input.publicId)
			.executeTakeFirst();
		if (!photo) return false;
		await trx
			.updateTable('photos')
			.set({ caption, caption_batch: 1 })
			.where('id', '=', photo.id)
			.execute();
		await writeAudit(
			trx,
			{
				userId: input.actorId,
				action: 'photo.caption',
				dieId: photo.die_id,
				detail: {
					photo: input.publicId,
					caption,
					before: { caption: photo.caption },
					after: { caption }
				}
			},
			at
		);
		return true;
	});
}
