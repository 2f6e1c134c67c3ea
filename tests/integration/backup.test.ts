import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fork } from 'node:child_process';
import { describe, expect, test } from 'vitest';
import SQLite from 'better-sqlite3';
import { migrateToLatest, openDatabase } from '../../src/lib/server/db/connect';
import { backupDatabase, checkIntegrity, restoreDatabase } from '../../src/lib/server/db/backup';

describe('online backup under write load', () => {
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
			const until = Date.now() + 1500;
			while (Date.now() < until) tx();
			process.send('done');`;
		const script = path.join(dir, 'writer.cjs');
		fs.writeFileSync(script, writerCode);
		const writer = fork(script);
		await new Promise((r) => setTimeout(r, 300));
		const target = path.join(dir, 'backup.db');
		await backupDatabase(live, target);
		await new Promise((r) => writer.on('message', r));

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
