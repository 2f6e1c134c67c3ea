import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openTestDatabase, type DB } from '../../src/lib/server/db/connect';
import { buildArchive } from '../../src/lib/server/archive/export';
import { restoreArchive } from '../../src/lib/server/archive/restore';
import { dieLife, findDie } from '../../src/lib/server/dies/die-detail';
import { listServicePlan } from '../../src/lib/server/dies/service-plan';
import { seedDemo } from '../../scripts/lib/demo-scenario';
import { folderPhotoStore } from '../../src/lib/server/photos/folder-store';
import { unzipSync } from 'fflate';

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
	}, 180_000);

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
