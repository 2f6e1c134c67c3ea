import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { execFile, fork } from 'node:child_process';
import { promisify } from 'node:util';
import { describe, expect, test } from 'vitest';
import SQLite from 'better-sqlite3';
import { migrations } from '../../migrations/index';
import { createScratchDatabase } from '../../scripts/lib/pg-scratch';
import {
	migrateToLatest,
	openDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import {
	backupDatabase,
	backupPostgres,
	checkIntegrity,
	listPostgresBackup,
	restoreDatabase,
	restorePostgres
} from '../../src/lib/server/db/backup';

const run = promisify(execFile);

// The SQLite file backup (better-sqlite3's backup API) has no PostgreSQL counterpart to test on the
// PostgreSQL pass; pg_dump and pg_restore are tested below instead.
describe.skipIf(testEngine() === 'postgres')('online backup under write load', () => {
	test('a backup taken while another process writes restores to a consistent database', async () => {
		const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-backup-'));
		const live = path.join(dir, 'live.db');
		const db = openDatabase(live);
		await migrateToLatest(db);
		await db.insertInto('customers').values({ code: 'ACME', name: 'Acme' }).execute();
		const alloy = await db.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
		await db
			.insertInto('dies')
			.values({
				number: 'D-1',
				part_name: 'P',
				customer_id: 1,
				alloy_id: alloy.id,
				process: 'hot_chamber',
				cavities: 1,
				projected_area_cm2: 10
			})
			.execute();
		await db.destroy();

		// A separate process writes ledger rows and totals in transactions the whole time.
		const writerCode = `
			const SQLite = require(${JSON.stringify(require.resolve('better-sqlite3'))});
			const db = new SQLite(${JSON.stringify(live)}); db.pragma('journal_mode = WAL'); db.pragma('busy_timeout = 5000');
			const ins = db.prepare("insert into shot_entries (die_id, counted_at, shots, source, created_at) values (1, '2026-01-01T00:00:00Z', 5, 'api', '2026-01-01T00:00:00Z')");
			const upd = db.prepare('update dies set total_shots = total_shots + 5 where id = 1');
			const tx = db.transaction(() => { ins.run(); upd.run(); });
			tx(); process.send('writing');
			const until = Date.now() + 1500;
			while (Date.now() < until) tx();
			process.send('done');`;
		const script = path.join(dir, 'writer.cjs');
		fs.writeFileSync(script, writerCode);
		const writer = fork(script);
		const said = (word: string) =>
			new Promise<void>((resolve) => writer.on('message', (m) => m === word && resolve()));
		const done = said('done');
		// Back up once the writer has committed and goes on writing (a forked process can take
		// longer than any fixed wait to start on a busy machine).
		await said('writing');
		const target = path.join(dir, 'backup.db');
		await backupDatabase(live, target);
		await done;

		expect(checkIntegrity(target)).toBe('ok');
		const restoredPath = path.join(dir, 'restored.db');
		fs.writeFileSync(restoredPath, '');
		restoreDatabase(target, restoredPath);
		const restored = new SQLite(restoredPath, { readonly: true });
		const { total } = restored
			.prepare('select total_shots as total from dies where id = 1')
			.get() as { total: number };
		const { sum, n } = restored
			.prepare('select coalesce(sum(shots),0) as sum, count(*) as n from shot_entries')
			.get() as { sum: number; n: number };
		restored.close();
		expect(n).toBeGreaterThan(0);
		expect(total).toBe(sum);
		expect(() => restoreDatabase(path.join(dir, 'writer.cjs'), restoredPath)).toThrow();
	});
});

/** One die and its ledger: three entries of 5, 7 and 11 shots (23 in all) unless told otherwise. */
async function seedLedger(db: DB, shots: number[] = [5, 7, 11]) {
	const customer = await db
		.insertInto('customers')
		.values({ code: 'ACME', name: 'Acme' })
		.returning('id')
		.executeTakeFirstOrThrow();
	const alloy = await db.selectFrom('alloys').select('id').executeTakeFirstOrThrow();
	const die = await db
		.insertInto('dies')
		.values({
			number: 'D-1',
			part_name: 'Pump housing',
			customer_id: customer.id,
			alloy_id: alloy.id,
			process: 'hot_chamber',
			cavities: 1,
			projected_area_cm2: 10
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	await addEntries(db, die.id, shots);
	return die.id;
}

async function addEntries(db: DB, dieId: number, shots: number[]) {
	for (const n of shots) {
		await db
			.insertInto('shot_entries')
			.values({
				die_id: dieId,
				counted_at: '2026-01-01T00:00:00.000Z',
				shots: n,
				source: 'api',
				created_at: '2026-01-01T00:00:00.000Z'
			})
			.execute();
		await db
			.updateTable('dies')
			.set((eb) => ({ total_shots: eb('total_shots', '+', n) }))
			.where('id', '=', dieId)
			.execute();
	}
}

async function ledgerOf(url: string) {
	const db = openDatabase(url, { poolSize: 1 });
	try {
		const entries = await db
			.selectFrom('shot_entries')
			.select((eb) => [eb.fn.countAll<number>().as('n'), eb.fn.sum<number>('shots').as('sum')])
			.executeTakeFirstOrThrow();
		const die = await db.selectFrom('dies').select('total_shots').executeTakeFirstOrThrow();
		const applied = await db
			.selectFrom('kysely_migration' as never)
			.select((eb) => eb.fn.countAll<number>().as('n'))
			.executeTakeFirstOrThrow();
		return { entries: entries.n, sum: entries.sum, total: die.total_shots, migrations: applied.n };
	} finally {
		await db.destroy();
	}
}

describe.skipIf(testEngine() !== 'postgres')('PostgreSQL backup and restore (pg_dump)', () => {
	test('npm run db:backup / db:restore copy a database to another and put one back', async () => {
		const base = process.env.TEST_DATABASE_URL!;
		const [live, other] = await Promise.all([
			createScratchDatabase(base, 'backup'),
			createScratchDatabase(base, 'restore')
		]);
		const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'castellan-pgbackup-'));
		const file = path.join(dir, 'castellan.dump');
		const cli = (script: string, url: string, arg: string) =>
			run('npx', ['tsx', `scripts/${script}.ts`, arg], {
				env: { ...process.env, DATABASE_URL: url }
			});
		try {
			const db = openDatabase(live.url, { poolSize: 1 });
			await migrateToLatest(db);
			const dieId = await seedLedger(db);
			await db.destroy();
			const migrationCount = Object.keys(migrations).length;
			const atBackup = { entries: 3, sum: 23, total: 23, migrations: migrationCount };
			expect(await ledgerOf(live.url)).toEqual(atBackup);

			const backup = await cli('db-backup', live.url, file);
			expect(backup.stdout).toMatch(/pg_dump custom format/);
			const tables = await listPostgresBackup(file);
			expect(tables).toEqual(expect.arrayContaining(['dies', 'shot_entries', 'kysely_migration']));
			await expect(backupPostgres(live.url, file)).rejects.toThrow(/exists already/);

			// Into an empty database: the same rows.
			await cli('db-restore', other.url, file);
			expect(await ledgerOf(other.url)).toEqual(atBackup);

			// Over the live database after more work (2 + 3 shots more): back to the backup's rows.
			const again = openDatabase(live.url, { poolSize: 1 });
			await addEntries(again, dieId, [2, 3]);
			await again.destroy();
			expect(await ledgerOf(live.url)).toEqual({ ...atBackup, entries: 5, sum: 28, total: 28 });
			await restorePostgres(file, live.url);
			expect(await ledgerOf(live.url)).toEqual(atBackup);

			// A file that is not a backup is refused before anything is dropped.
			const notADump = path.join(dir, 'notes.txt');
			fs.writeFileSync(notADump, 'not a dump');
			await expect(restorePostgres(notADump, other.url)).rejects.toThrow(/not a PostgreSQL backup/);
			expect(await ledgerOf(other.url)).toEqual(atBackup);
		} finally {
			fs.rmSync(dir, { recursive: true, force: true });
			await Promise.all([live.drop(), other.drop()]);
		}
	}, 120_000);
});
