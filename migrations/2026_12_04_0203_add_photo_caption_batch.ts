import { sql, type Kysely } from 'kysely';

// Frozen in time: never edit a migration that has shipped; add a new one instead.
// Until now one caption typed for an upload was copied onto every photo of that upload, so two
// photos (say "before" and "after") carried the same words. Captions are per photo from now on.
// Which words were meant for which photo cannot be known afterwards, so nothing is rewritten:
// each photo of such an upload keeps the words and `caption_batch` records how many photos the
// caption was typed once for (1 = its own caption). The viewer says so, and the plant can give
// each photo its own caption, which sets it back to 1.

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('photos')
		.addColumn('caption_batch', 'integer', (c) => c.notNull().defaultTo(1))
		.execute();
	// An upload is one record (job or inspection), one instant and one uploader.
	await sql`update photos set caption_batch = (
			select count(*) from photos p2
			 where p2.caption = photos.caption
			   and p2.uploaded_at = photos.uploaded_at
			   and coalesce(p2.job_id, -1) = coalesce(photos.job_id, -1)
			   and coalesce(p2.inspection_id, -1) = coalesce(photos.inspection_id, -1)
			   and coalesce(p2.uploaded_by, '') = coalesce(photos.uploaded_by, ''))
		where caption is not null`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('photos').dropColumn('caption_batch').execute();
}
