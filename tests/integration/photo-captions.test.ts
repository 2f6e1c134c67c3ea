// Captions are per photo. Before, one caption typed for an upload was copied onto every photo of
// it, so two shared photos carried the same words. The upgrade keeps those words on each (which
// photo they were meant for cannot be known) and marks them as typed once for the upload; a
// caption set on one photo is its own.
import { Migrator, sql, type MigrationProvider } from 'kysely';
import { describe, expect, test } from 'vitest';
import { migrations } from '../../migrations/index';
import { openDatabase, testEngine } from '../../src/lib/server/db/connect';
import { loadPhotoView, setPhotoCaption } from '../../src/lib/server/toolroom/photos';

const TARGET = '2026_12_04_0203_add_photo_caption_batch';
const provider: MigrationProvider = { getMigrations: async () => migrations };

// Upgrades a SQLite plant database from an older schema; PostgreSQL databases start at the latest
// schema (nothing to upgrade), and every other test runs the migrations on PostgreSQL.
describe.skipIf(testEngine() === 'postgres')('photo captions', () => {
	test('an upgrade marks a caption copied across one upload; a new caption is the photo’s own', async () => {
		const db = openDatabase(':memory:');
		const names = Object.keys(migrations);
		const migrator = new Migrator({ db, provider });
		const before = await migrator.migrateTo(names[names.indexOf(TARGET) - 1]);
		if (before.error) throw before.error;
		await sql`insert into customers (code, name) values ('ACME', 'Acme')`.execute(db);
		await sql`insert into users (id, email, name, role, customer_id, password_hash)
			values ('u-lead', 'lead@plant.test', 'Lead', 'toolroom_lead', null, 'x')`.execute(db);
		await sql`insert into dies (number, part_name, customer_id, alloy_id, process, cavities,
			projected_area_cm2, status, created_at, updated_at)
			values ('M-0001', 'Part', 1, (select id from alloys limit 1), 'hot_chamber', 1, 100, 'ready',
			'2026-01-01T00:00:00.000Z', '2026-01-01T00:00:00.000Z')`.execute(db);
		await sql`insert into toolroom_jobs (number, die_id, kind, half, description, die_shots_at_open, opened_at)
			values ('TJ-00001', 1, 'repair', 'cover', 'Crack', 0, '2026-02-01T00:00:00.000Z')`.execute(db);
		const photo = (id: string, caption: string | null, at: string) =>
			sql`insert into photos (public_id, job_id, inspection_id, die_id, full_file, thumb_file, width,
				height, sha256, bytes, thumb_bytes, source_type, uploaded_by, uploaded_at, caption)
				values (${id}, 1, null, 1, ${id + '.jpg'}, ${id + '-t.jpg'}, 10, 10, 'x', 1, 1, 'jpeg',
				'u-lead', ${at}, ${caption})`.execute(db);
		const t1 = '2026-02-02T10:00:00.000Z';
		const t2 = '2026-02-03T10:00:00.000Z';
		// One upload of two photos with one caption (the copy), one photo alone, one without words.
		await photo('a', 'Parting line, before and after', t1);
		await photo('b', 'Parting line, before and after', t1);
		await photo('c', 'Gate side', t2);
		await photo('d', null, t2);
		const after = await migrator.migrateTo(TARGET);
		if (after.error) throw after.error;

		const lead = { role: 'toolroom_lead', customerId: null };
		const view = async (id: string) => (await loadPhotoView(db, id, lead))!;
		expect((await view('a')).captionBatch).toBe(2);
		expect((await view('b')).captionBatch).toBe(2);
		expect((await view('c')).captionBatch).toBe(1);
		expect((await view('d')).captionBatch).toBe(1);
		// The words themselves are not rewritten.
		expect((await view('a')).caption).toBe('Parting line, before and after');

		expect(
			await setPhotoCaption(db, { publicId: 'b', caption: '  After polishing ', actorId: 'u-lead' })
		).toBe(true);
		expect(await view('b')).toMatchObject({ caption: 'After polishing', captionBatch: 1 });
		expect(await view('a')).toMatchObject({
			caption: 'Parting line, before and after',
			captionBatch: 2
		});
		expect(await setPhotoCaption(db, { publicId: 'zz', caption: 'x', actorId: 'u-lead' })).toBe(
			false
		);
		// An owner sees only shared photos of its own dies: none of these is shared.
		expect(await loadPhotoView(db, 'a', { role: 'customer', customerId: 1 })).toBeUndefined();
		await db.destroy();
	});
});
