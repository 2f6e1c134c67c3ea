import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
	migrateToLatest,
	openDatabase,
	openTestDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import { inReadSession } from '../../src/lib/server/db/session';
import { buildArchive } from '../../src/lib/server/archive/export';
import { ARCHIVE_TABLES } from '../../src/lib/server/archive/tables';
import { tableShape } from '../../src/lib/server/archive/catalog';
import { restoreArchive } from '../../src/lib/server/archive/restore';
import { dieLife, findDie } from '../../src/lib/server/dies/die-detail';
import { listServicePlan } from '../../src/lib/server/dies/service-plan';
import { seedDemo } from '../../scripts/lib/demo-scenario';
import { folderPhotoStore } from '../../src/lib/server/photos/folder-store';
import { unzipSync, zipSync } from 'fflate';

const ASOF = '2026-12-01T06:00:00.000Z';
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-archive-'));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

/** Every figure a plant reads per die, through the functions the pages use. */
async function figures(db: DB) {
	const numbers = (await db.selectFrom('dies').select('number').orderBy('number').execute()).map(
		(d) => d.number
	);
	const out: Record<string, unknown> = {};
	for (const n of numbers) {
		const die = (await findDie(db, n, { customerId: null }))!;
		const life = await dieLife(db, die, ASOF);
		const plan = await listServicePlan(db, die, life.shotsPerDay ?? 0, ASOF);
		out[n] = { total: die.total_shots, life, plan };
	}
	const ledger = await db
		.selectFrom('shot_entries')
		.select([
			'die_id',
			'source',
			(eb) => eb.fn.sum<number>('shots').as('s'),
			(eb) => eb.fn.countAll().as('n')
		])
		.groupBy(['die_id', 'source'])
		.orderBy('die_id')
		.orderBy('source')
		.execute();
	return { dies: out, ledger };
}

/** Secrets the archive leaves out (see tables.ts), compared apart. */
const LEFT_OUT: Record<string, string[]> = {
	users: ['password_hash'],
	api_tokens: ['token_hash', 'revoked_at']
};

/** Every archived table, row by row in key order: ids, references, counts and texts as stored. */
async function everyRow(db: DB) {
	return inReadSession(db, async (s) => {
		const out: Record<string, Record<string, unknown>[]> = {};
		for (const t of ARCHIVE_TABLES) {
			const { columns, primaryKey } = await tableShape(s, t.table);
			const keep = columns.filter((c) => !LEFT_OUT[t.table]?.includes(c));
			out[t.table] = await s.all(
				`select ${keep.map((c) => `"${c}"`).join(', ')} from "${t.table}" order by ${primaryKey.map((c) => `"${c}"`).join(', ')}`
			);
		}
		return out;
	});
}

/** A die with only what the register requires; returns its id. */
async function addDie(
	db: DB,
	die: { id?: number; number: string; customer_id: number; alloy_id: number }
): Promise<number> {
	const row = await db
		.insertInto('dies')
		.values({
			part_name: 'Cover',
			process: 'cold_chamber',
			cavities: 1,
			projected_area_cm2: 10,
			...die
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return row.id;
}

/** A demo plant on a SQLite file of its own, whichever engine this pass tests. */
async function sqliteDemo(uploads: string): Promise<DB> {
	const db = openDatabase(path.join(tmp, `demo-${Date.now()}.db`));
	await migrateToLatest(db);
	await seedDemo(db, new Date('2026-11-30T12:00:00.000Z'), folderPhotoStore(uploads));
	return db;
}

describe('export everything, import into an empty database', () => {
	it('reproduces every die total, life used, next service and the ledger sums', async () => {
		const source = await openTestDatabase();
		const srcUploads = path.join(tmp, 'src');
		fs.mkdirSync(srcUploads);
		await seedDemo(source, new Date('2026-11-30T12:00:00.000Z'), folderPhotoStore(srcUploads));
		const before = await figures(source);
		expect(Object.keys(before.dies).length).toBeGreaterThan(30);

		const { zip, summary } = await buildArchive(source, folderPhotoStore(srcUploads));
		const names = Object.keys(unzipSync(zip));
		for (const f of [
			'dies.csv',
			'halves.csv',
			'ledger.csv',
			'service_tasks.csv',
			'jobs.csv',
			'inspections.csv',
			'cooling_checks.csv',
			'bookings.csv',
			'customers.csv',
			'presses.csv',
			'README.txt'
		]) {
			expect(names).toContain(f);
		}
		expect(summary.photos).toBeGreaterThan(0);

		const target = await openTestDatabase();
		const dstUploads = path.join(tmp, 'dst');
		const res = await restoreArchive(target, zip, folderPhotoStore(dstUploads));
		expect(res, JSON.stringify(res)).toMatchObject({ ok: true });
		const after = await figures(target);
		expect(after).toEqual(before);
		// Ledger sums per die equal the kept totals on both sides (sum over the ledger vs dies.total_shots).
		const sums = new Map<number, number>();
		for (const r of after.ledger) sums.set(r.die_id, (sums.get(r.die_id) ?? 0) + Number(r.s));
		const totals = await target.selectFrom('dies').select(['id', 'total_shots']).execute();
		for (const d of totals) expect(sums.get(d.id) ?? 0).toBe(d.total_shots);
		// Photo files came back byte for byte.
		const photo = await target.selectFrom('photos').select(['full_file']).executeTakeFirstOrThrow();
		expect(fs.readFileSync(path.join(dstUploads, photo.full_file))).toEqual(
			fs.readFileSync(path.join(srcUploads, photo.full_file))
		);
		// Passwords stay out of the archive.
		const users = await target.selectFrom('users').select('password_hash').execute();
		expect(users.every((u) => u.password_hash === '!')).toBe(true);
		// Every other stored value came back as it was, ids included.
		expect(await everyRow(target)).toEqual(await everyRow(source));
	}, 180_000);

	it('keeps ids, fills in references that point forward, and new rows number on after them', async () => {
		const source = await openTestDatabase();
		const uploads = path.join(tmp, 'refs');
		fs.mkdirSync(uploads);
		await source
			.insertInto('users')
			.values({ id: 'u-1', email: 'a@p.test', name: 'A', role: 'admin', password_hash: 'x' })
			.execute();
		// Ids with gaps: 7 and 40 (rows in between were deleted), so only kept ids line up.
		await source
			.insertInto('customers')
			.values([
				{ id: 7, code: 'ACME', name: 'Acme' },
				{ id: 40, code: 'BOLT', name: 'Bolt' }
			])
			.execute();
		const alloy = await source
			.selectFrom('alloys')
			.select('id')
			.where('code', '=', 'A380')
			.executeTakeFirstOrThrow();
		await addDie(source, { id: 12, number: 'R-1', customer_id: 40, alloy_id: alloy.id });
		await source
			.insertInto('die_halves')
			.values({
				id: 3,
				die_id: 12,
				side: 'cover',
				serial: 'R-1-C1',
				steel: 'H13',
				installed_at: ASOF
			})
			.execute();
		await source
			.insertInto('toolroom_jobs')
			.values({
				id: 9,
				number: 'J-9',
				die_id: 12,
				kind: 'repair',
				half: 'cover',
				description: 'Crack at the gate',
				die_shots_at_open: 0,
				opened_at: ASOF
			} as never)
			.execute();
		const jpeg = new Uint8Array([0xff, 0xd8, 0xff, 0xd9]);
		fs.writeFileSync(path.join(uploads, 'p5.jpg'), jpeg);
		fs.writeFileSync(path.join(uploads, 'p5t.jpg'), jpeg);
		await source
			.insertInto('photos')
			.values({
				id: 5,
				public_id: 'pub-5',
				job_id: 9,
				inspection_id: null,
				die_id: 12,
				full_file: 'p5.jpg',
				thumb_file: 'p5t.jpg',
				width: 1,
				height: 1,
				sha256: createHash('sha256').update(jpeg).digest('hex'),
				bytes: 4,
				thumb_bytes: 4,
				source_type: 'jpeg',
				uploaded_by: 'u-1',
				uploaded_at: ASOF,
				caption: null
			})
			.execute();
		// The half's picture is photo 5: a reference to a table restored after die_halves.
		await source
			.updateTable('die_halves')
			.set({ picture_photo_id: 5 })
			.where('id', '=', 3)
			.execute();

		const { zip } = await buildArchive(source, folderPhotoStore(uploads));
		const target = await openTestDatabase();
		const res = await restoreArchive(target, zip, folderPhotoStore(path.join(tmp, 'refs-back')));
		expect(res, JSON.stringify(res)).toMatchObject({ ok: true, photos: 2 });
		expect(await everyRow(target)).toEqual(await everyRow(source));
		const half = await target
			.selectFrom('die_halves')
			.select('picture_photo_id')
			.executeTakeFirstOrThrow();
		expect(half.picture_photo_id).toBe(5);
		// New rows take the next id after the highest restored: customer 41, die 13.
		const next = await target
			.insertInto('customers')
			.values({ code: 'CAST', name: 'Cast' })
			.returning('id')
			.executeTakeFirstOrThrow();
		expect(next.id).toBe(41);
		expect(await addDie(target, { number: 'R-2', customer_id: 7, alloy_id: alloy.id })).toBe(13);
	});

	it('refuses an archive whose rows name records it does not hold, and writes nothing', async () => {
		const source = await openTestDatabase();
		await source
			.insertInto('customers')
			.values([
				{ id: 1, code: 'ACME', name: 'Acme' },
				{ id: 2, code: 'BOLT', name: 'Bolt' }
			])
			.execute();
		const alloy = await source.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
		await addDie(source, { number: 'D-1', customer_id: 2, alloy_id: alloy.id });
		// The archive loses owner 2 (its line in customers.csv) while die D-1 still names it.
		const files = unzipSync((await buildArchive(source, folderPhotoStore(tmp))).zip);
		const lines = new TextDecoder().decode(files['customers.csv']).split('\r\n');
		expect(lines[2]).toMatch(/^2,"BOLT"/);
		files['customers.csv'] = new TextEncoder().encode(lines.filter((_, i) => i !== 2).join('\r\n'));
		const target = await openTestDatabase();
		const res = await restoreArchive(target, zipSync(files), folderPhotoStore(tmp));
		expect(res).toEqual({ ok: false, message: expect.stringContaining('do not fit together') });
		expect(await target.selectFrom('customers').selectAll().execute()).toEqual([]);
	});

	it('refuses to restore into a database that already has a plant, and writes nothing', async () => {
		const source = await openTestDatabase();
		await source.insertInto('customers').values({ code: 'ACME', name: 'Acme' }).execute();
		const { zip } = await buildArchive(source, folderPhotoStore(tmp));
		const res = await restoreArchive(source, zip, folderPhotoStore(tmp));
		expect(res).toEqual({ ok: false, message: expect.stringContaining('not empty') });
		const notZip = await restoreArchive(
			await openTestDatabase(),
			new Uint8Array([1, 2, 3]),
			folderPhotoStore(tmp)
		);
		expect(notZip).toEqual({ ok: false, message: 'The file is not a ZIP archive.' });
	});
});

// The engines' own round trip is the suite above (run on each engine's pass); this one crosses
// them: a SQLite plant moves to PostgreSQL and back. Only on the PostgreSQL pass, which has both.
describe.skipIf(testEngine() !== 'postgres')('moving a plant between engines', () => {
	it('SQLite → PostgreSQL → SQLite keeps every row, id and photo', async () => {
		const uploads = path.join(tmp, 'cross');
		fs.mkdirSync(uploads);
		const sqlite = await sqliteDemo(uploads);
		const rows = await everyRow(sqlite);
		expect(rows.dies.length).toBeGreaterThan(30);

		const pg = await openTestDatabase();
		const photos = folderPhotoStore(uploads);
		const there = await restoreArchive(pg, (await buildArchive(sqlite, photos)).zip, photos);
		expect(there, JSON.stringify(there)).toMatchObject({ ok: true });
		expect(await everyRow(pg)).toEqual(rows);

		const back = openDatabase(path.join(tmp, 'back.db'));
		await migrateToLatest(back);
		const again = await restoreArchive(back, (await buildArchive(pg, photos)).zip, photos);
		expect(again, JSON.stringify(again)).toMatchObject({ ok: true });
		expect(await everyRow(back)).toEqual(rows);
		await Promise.all([sqlite.destroy(), pg.destroy(), back.destroy()]);
	}, 240_000);
});
