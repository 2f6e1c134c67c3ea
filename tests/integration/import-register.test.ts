import { beforeEach, describe, expect, it } from 'vitest';
import {
	openTestDatabase,
	reopenDatabase,
	testEngine,
	type DB
} from '../../src/lib/server/db/connect';
import { readImportFile, MAX_IMPORT_BYTES } from '../../src/lib/server/import/read-file';
import {
	createDraft,
	loadDraft,
	newPayload,
	previewImport,
	rememberMapping,
	type Draft
} from '../../src/lib/server/import/draft';
import { commitImport } from '../../src/lib/server/import/commit';
import { importProgress, startImportJob } from '../../src/lib/server/import/jobs';
import type { ImportPayload } from '../../src/lib/server/import/types';
import { csvBytes, workbookBytes, type SheetCells } from '../fixtures/import-workbook';

const ADMIN = 'u-admin';
const NOW = '2026-06-10T12:00:00.000Z';

async function plant(): Promise<DB> {
	const db = await openTestDatabase();
	await db
		.insertInto('users')
		.values({
			id: ADMIN,
			email: 'a@plant.test',
			name: 'Admin',
			role: 'admin',
			customer_id: null,
			password_hash: 'x'
		})
		.execute();
	await db
		.insertInto('customers')
		.values([
			{ code: 'ACME', name: 'Acme Castings' },
			{ code: 'BOLT', name: 'Bolt Motors' }
		])
		.execute();
	return db;
}

const HEAD = [
	'Die No',
	'Part',
	'Customer',
	'Alloy',
	'Process',
	'Cavities',
	'Projected area cm2',
	'Shots',
	'Cover serial',
	'Cover installed'
];

/** 600 dies, D-1001 … D-1600; die i has 1000·i opening shots. Problems put on chosen rows. */
function sixHundred(): SheetCells {
	const rows: SheetCells = [HEAD];
	for (let i = 1; i <= 600; i++) {
		const n = `D-${1000 + i}`;
		rows.push([
			n,
			`Housing ${i}`,
			i % 2 ? 'ACME' : 'Bolt Motors',
			i % 3 ? 'A380' : 'ZP0410',
			i % 3 ? 'cold_chamber' : 'hot',
			1 + (i % 4),
			100 + i,
			1000 * i,
			null,
			null
		]);
	}
	// Spreadsheet row = data index + 2.
	rows[10][3] = 'AlSi9Cu3 special'; // row 11: unknown alloy
	rows[20][0] = 'D-1005'; // row 21: duplicate of row 6
	rows[30][7] = '12,5'; // row 31: a comma in the whole-number shots column
	rows[40][9] = '2024-03-14'; // row 41: ISO text, taken
	rows[41][9] = '14.03.2024'; // row 42: day-first text, refused with the one reading offered
	rows[42][9] = '03/04/2024'; // row 43: could be 3 April or 4 March, refused
	rows[43][9] = new Date(Date.UTC(2024, 2, 14)); // row 44: a real date cell, taken
	return rows;
}

async function payloadOf(db: DB, bytes: Uint8Array, name: string): Promise<ImportPayload> {
	const read = await readImportFile(bytes, name);
	if (!read.ok) throw new Error(read.message);
	return newPayload(db, name, read.sheets);
}

const count = async (
	db: DB,
	table: 'dies' | 'shot_entries' | 'audit_log' | 'alloys' | 'die_halves'
) =>
	Number(
		(
			await db
				.selectFrom(table)
				.select((eb) => eb.fn.countAll().as('n'))
				.executeTakeFirstOrThrow()
		).n
	);

/**
 * The same database as a second app process sees it: on PostgreSQL a pool of its own on the same
 * database (so two writers really run at once); SQLite in memory has one connection, shared.
 */
async function asAnotherProcess(db: DB): Promise<DB> {
	if (testEngine() === 'sqlite') return db;
	return reopenDatabase(db);
}

/** The Dies sheet's columns under the field names, so the mapping guesses itself. */
const DIE_COLUMNS = [
	'number',
	'part_name',
	'owner',
	'alloy',
	'process',
	'cavities',
	'projected_area_cm2',
	'opening_shots'
] as const;

/** 30 new dies, N-1 … N-30, die i with 100·i opening shots. */
function thirtyDies(): SheetCells {
	const rows: SheetCells = [[...DIE_COLUMNS]];
	for (let i = 1; i <= 30; i++)
		rows.push([`N-${i}`, `Lid ${i}`, 'ACME', 'A380', 'cold', 1, 20, 100 * i]);
	return rows;
}

describe('die register import', () => {
	let db: DB;
	beforeEach(async () => {
		db = await plant();
	});

	it('previews a 600-die workbook with each problem on its row and commits nothing until fixed', async () => {
		const payload = await payloadOf(
			db,
			await workbookBytes({ Dies: sixHundred() }),
			'register.xlsx'
		);
		payload.mapping.dies = {
			number: 'Die No',
			part_name: 'Part',
			owner: 'Customer',
			alloy: 'Alloy',
			process: 'Process',
			cavities: 'Cavities',
			projected_area_cm2: 'Projected area cm2',
			opening_shots: 'Shots',
			cover_serial: 'Cover serial',
			cover_installed: 'Cover installed'
		};
		const preview = await previewImport(db, payload);
		const rows = preview.sheets[0].rows;
		expect(rows).toHaveLength(600);
		const problemLines = rows
			.filter((r) => r.problems.length)
			.map((r) => [r.line, r.problems.map((p) => p.field)]);
		expect(problemLines).toEqual([
			[11, ['alloy']],
			[21, ['number']],
			[31, ['opening_shots']],
			[42, ['cover_installed']],
			[43, ['cover_installed']]
		]);
		const msg = (line: number) => rows.find((r) => r.line === line)!.problems[0].message;
		expect(msg(11)).toContain('Unknown alloy "AlSi9Cu3 special"');
		expect(msg(21)).toBe('Die D-1005 is also on row 6.');
		expect(msg(31)).toContain('write 12.5');
		expect(msg(42)).toBe('Write 14.03.2024 as 2024-03-14 (YYYY-MM-DD).');
		expect(msg(43)).toBe(
			'03/04/2024 could be 2024-04-03 or 2024-03-04: write the date as YYYY-MM-DD.'
		);
		expect(preview.unknownAlloys).toEqual(['AlSi9Cu3 special']);
		expect(preview.ready).toBe(false);

		const refused = await commitImport(db, payload, { userId: ADMIN, now: NOW });
		expect(refused.ok).toBe(false);
		expect(await count(db, 'dies')).toBe(0);
		expect(await count(db, 'shot_entries')).toBe(0);
		expect(await count(db, 'audit_log')).toBe(0);

		// Fix: pick A380 for the unknown alloy, skip the duplicate, retype the comma and the dates.
		const a380 = await db
			.selectFrom('alloys')
			.select('id')
			.where('code', '=', 'A380')
			.executeTakeFirstOrThrow();
		payload.alloys['alsi9cu3 special'] = { alloyId: a380.id };
		payload.skips.push('dies:19');
		payload.fixes['dies:29:opening_shots'] = '30500';
		payload.fixes['dies:40:cover_installed'] = '2024-03-14';
		payload.fixes['dies:41:cover_installed'] = '2024-04-03';
		const fixed = await previewImport(db, payload);
		expect(fixed.ready).toBe(true);
		expect(fixed.counts.create).toBe(599);

		const done = await commitImport(db, payload, { userId: ADMIN, now: NOW });
		expect(done.ok).toBe(true);
		expect(await count(db, 'dies')).toBe(599);
		// Opening counts by hand: 1000·(1+…+600) = 1000·600·601/2 = 180 300 000; less row 21's
		// skipped 20 000 (i = 20), less row 31's 30 000 (i = 30) plus the retyped 30 500.
		const sum = await db
			.selectFrom('dies')
			.select((eb) => eb.fn.sum<number>('total_shots').as('s'))
			.executeTakeFirstOrThrow();
		expect(Number(sum.s)).toBe(180_300_000 - 20_000 - 30_000 + 30_500);
		const ledger = await db
			.selectFrom('shot_entries')
			.select((eb) => [eb.fn.sum<number>('shots').as('s'), eb.fn.countAll().as('n')])
			.where('source', '=', 'opening')
			.executeTakeFirstOrThrow();
		expect(Number(ledger.s)).toBe(180_300_000 - 20_000 - 30_000 + 30_500);
		expect(Number(ledger.n)).toBe(599);
		// Not production of the import day: the daily roll-up (trailing rates, due dates) stays empty.
		expect(await db.selectFrom('shot_daily').selectAll().execute()).toEqual([]);
		const d1042 = await db
			.selectFrom('dies')
			.innerJoin('die_halves', 'die_halves.die_id', 'dies.id')
			.select([
				'die_halves.side',
				'die_halves.installed_at',
				'die_halves.shots',
				'die_halves.serial',
				'dies.total_shots'
			])
			.where('dies.number', '=', 'D-1040')
			.where('die_halves.side', '=', 'cover')
			.executeTakeFirstOrThrow();
		expect(d1042).toEqual({
			side: 'cover',
			installed_at: '2024-03-14T00:00:00.000Z',
			shots: 40_000,
			serial: 'D-1040-C1',
			total_shots: 40_000
		});
		const d1043 = await db
			.selectFrom('dies')
			.innerJoin('die_halves', 'die_halves.die_id', 'dies.id')
			.select('die_halves.installed_at')
			.where('dies.number', '=', 'D-1042')
			.where('die_halves.side', '=', 'cover')
			.executeTakeFirstOrThrow();
		expect(d1043.installed_at).toBe('2024-04-03T00:00:00.000Z');
		// A real date cell is taken as its calendar day.
		const d1044 = await db
			.selectFrom('dies')
			.innerJoin('die_halves', 'die_halves.die_id', 'dies.id')
			.select('die_halves.installed_at')
			.where('dies.number', '=', 'D-1043')
			.where('die_halves.side', '=', 'cover')
			.executeTakeFirstOrThrow();
		expect(d1044.installed_at).toBe('2024-03-14T00:00:00.000Z');
	});

	it('a dry run reports exactly what the real run then does, and writes nothing', async () => {
		const rows: SheetCells = [[...DIE_COLUMNS]];
		for (let i = 1; i <= 40; i++)
			rows.push([
				`X-${i}`,
				`Bracket ${i}`,
				i < 20 ? 'ACME' : 'NEWCO',
				'A380',
				'cold',
				2,
				55.5,
				500 * i
			]);
		const payload = await payloadOf(db, csvBytes(rows), 'x.csv');
		payload.owners['newco'] = { create: { code: 'NEWCO', name: 'New Company' } };
		const before = await Promise.all(
			(['dies', 'shot_entries', 'audit_log', 'die_halves'] as const).map((t) => count(db, t))
		);
		const dry = await commitImport(db, payload, { userId: ADMIN, now: NOW, dryRun: true });
		expect(
			await Promise.all(
				(['dies', 'shot_entries', 'audit_log', 'die_halves'] as const).map((t) => count(db, t))
			)
		).toEqual(before);
		expect(
			await db.selectFrom('customers').select('id').where('code', '=', 'NEWCO').executeTakeFirst()
		).toBeUndefined();
		const real = await commitImport(db, payload, { userId: ADMIN, now: NOW });
		expect(dry.ok && real.ok).toBe(true);
		if (!dry.ok || !real.ok) return;
		expect({ ...dry.outcome, dryRun: false }).toEqual(real.outcome);
		// By hand: 40 dies, 2 halves each, one new owner; 500·(1+…+40) = 500·820 = 410 000 shots.
		expect(real.outcome.created).toHaveLength(40);
		expect(real.outcome.halves).toBe(80);
		expect(real.outcome.openingShots).toBe(410_000);
		expect(real.outcome.newOwners).toEqual(['NEWCO']);
		expect(await count(db, 'dies')).toBe(40);
		expect(await count(db, 'die_halves')).toBe(80);
		// 40 die.import + 1 customer.create + 1 import.commit
		expect(await count(db, 'audit_log')).toBe(42);
		expect(real.outcome.auditEntries).toBe(42);
	});

	it('update mode changes only the mapped columns and writes each change to the audit log', async () => {
		// The die columns with location before the opening count.
		const rows: SheetCells = [[...DIE_COLUMNS.slice(0, 7), 'location', 'opening_shots']];
		rows.push(['U-1', 'Cover', 'ACME', 'A380', 'cold', 2, 80, 'Rack 1', 1000]);
		rows.push(['U-2', 'Lid', 'BOLT', 'ZP0410', 'hot', 4, 30, 'Rack 2', 2000]);
		const first = await payloadOf(db, csvBytes(rows), 'start.csv');
		expect((await commitImport(db, first, { userId: ADMIN, now: NOW })).ok).toBe(true);
		const before = await db.selectFrom('dies').selectAll().orderBy('number').execute();

		// The update sheet has more columns than are mapped: only number, location and cavities are.
		const upd = await payloadOf(
			db,
			csvBytes([
				['Die', 'Where', 'Cav', 'Part'],
				['U-1', 'Bay 7', 2, 'SHOULD NOT APPLY'],
				['U-2', 'Rack 2', 6, 'SHOULD NOT APPLY']
			]),
			'update.csv'
		);
		upd.mode = 'update';
		upd.mapping.dies = { number: 'Die', location: 'Where', cavities: 'Cav' };
		const preview = await previewImport(db, upd);
		expect(preview.ready).toBe(true);
		expect(preview.sheets[0].rows.map((r) => r.changes)).toEqual([
			[{ field: 'location', from: 'Rack 1', to: 'Bay 7' }],
			[{ field: 'cavities', from: '4', to: '6' }]
		]);
		const res = await commitImport(db, upd, { userId: ADMIN, now: '2026-06-11T08:00:00.000Z' });
		expect(res.ok).toBe(true);
		const after = await db.selectFrom('dies').selectAll().orderBy('number').execute();
		expect(after[0]).toEqual({
			...before[0],
			location: 'Bay 7',
			updated_at: '2026-06-11T08:00:00.000Z'
		});
		expect(after[1]).toEqual({ ...before[1], cavities: 6, updated_at: '2026-06-11T08:00:00.000Z' });
		const audit = await db
			.selectFrom('audit_log')
			.select(['action', 'die_id', 'detail'])
			.where('action', '=', 'die.import_update')
			.orderBy('id')
			.execute();
		expect(audit.map((a) => [a.die_id, JSON.parse(a.detail).changes])).toEqual([
			[before[0].id, [{ field: 'location', from: 'Rack 1', to: 'Bay 7' }]],
			[before[1].id, [{ field: 'cavities', from: '4', to: '6' }]]
		]);
	});

	it('imports halves with serials and install dates and the last service of each task', async () => {
		const bytes = await workbookBytes({
			Dies: [[...DIE_COLUMNS], ['H-1', 'Gearbox', 'ACME', 'A380', 'cold', 1, 900, 100_000]],
			Halves: [
				['die', 'side', 'serial', 'installed', 'removed', 'half_shots', 'removal_reason'],
				['H-1', 'cover', 'H1-C1', '2023-01-10', '2024-06-01', 40_000, 'heat checking'],
				['H-1', 'cover', 'H1-C2', '2024-06-02', null, 60_000, null],
				['H-1', 'ejector', 'H1-E1', '2023-01-10', null, null, null]
			],
			'Service tasks': [
				['die', 'task', 'last_done', 'last_done_shots'],
				['H-1', 'stress_relief', '2026-01-10', 90_000]
			]
		});
		const payload = await payloadOf(db, bytes, 'halves.xlsx');
		const preview = await previewImport(db, payload);
		expect(preview.fileProblems).toEqual([]);
		expect(preview.ready).toBe(true);
		expect((await commitImport(db, payload, { userId: ADMIN, now: NOW })).ok).toBe(true);
		const halves = await db
			.selectFrom('die_halves')
			.select(['serial', 'active', 'shots', 'die_shots_at_install', 'removed_at'])
			.orderBy('serial')
			.execute();
		// Current cover went in when the die had 100 000 − 60 000 = 40 000 shots.
		expect(halves).toEqual([
			{
				serial: 'H1-C1',
				active: 0,
				shots: 40_000,
				die_shots_at_install: 0,
				removed_at: '2024-06-01T00:00:00.000Z'
			},
			{ serial: 'H1-C2', active: 1, shots: 60_000, die_shots_at_install: 40_000, removed_at: null },
			{ serial: 'H1-E1', active: 1, shots: 100_000, die_shots_at_install: 0, removed_at: null }
		]);
		const task = await db
			.selectFrom('service_tasks')
			.select(['last_done_at', 'last_done_shots', 'interval_shots'])
			.where('kind', '=', 'stress_relief')
			.executeTakeFirstOrThrow();
		expect(task).toEqual({
			last_done_at: '2026-01-10T00:00:00.000Z',
			last_done_shots: 90_000,
			interval_shots: 15_000
		});
	});

	it('the same file committed by two app processes at once is written once', async () => {
		const other = await asAnotherProcess(db);
		const payload = await payloadOf(db, csvBytes(thirtyDies()), 'twice.csv');
		const results = await Promise.all([
			commitImport(db, payload, { userId: ADMIN, now: NOW }),
			commitImport(other, payload, { userId: ADMIN, now: NOW })
		]);
		// One writes all 30 dies; the other judges the file again after it and finds them there.
		expect(results.map((r) => r.ok).sort()).toEqual([false, true]);
		const refused = results.find((r) => !r.ok)!;
		expect(refused.ok === false && refused.preview?.counts.problemRows).toBe(30);
		expect(await count(db, 'dies')).toBe(30);
		expect(await count(db, 'shot_entries')).toBe(30);
		// 100·(1+…+30) = 100·465 = 46 500 opening shots, once.
		const sum = await db
			.selectFrom('dies')
			.select((eb) => eb.fn.sum<number>('total_shots').as('s'))
			.executeTakeFirstOrThrow();
		expect(Number(sum.s)).toBe(46_500);
		if (other !== db) await other.destroy();
	});

	it('the background job commits a draft and leaves its outcome on the draft', async () => {
		const payload = await payloadOf(db, csvBytes(thirtyDies()), 'job.csv');
		const id = await createDraft(db, ADMIN, payload);
		expect(await startImportJob(db, id, payload, ADMIN)).toBe(true);
		// A second start of the same draft is refused while (and after) the first runs.
		expect(await startImportJob(db, id, payload, ADMIN)).toBe(false);
		let draft = (await loadDraft(db, id, ADMIN))!;
		while (draft.state === 'running') {
			await new Promise((resolve) => setTimeout(resolve, 20));
			draft = (await loadDraft(db, id, ADMIN))!;
		}
		expect(draft.state).toBe('done');
		expect(draft.result).toMatchObject({ created: expect.any(Array), openingShots: 46_500 });
		expect((draft.result as { created: string[] }).created).toHaveLength(30);
		expect(draft.heartbeatAt).toBeNull();
		expect([draft.progressDone, draft.progressTotal]).toEqual([30, 30]);
		expect(importProgress(draft)).toBeNull();
		expect(await count(db, 'dies')).toBe(30);
	});

	it('remembers the column mapping for the next file of the plant', async () => {
		await rememberMapping(db, 'dies', { number: 'Werkzeug', part_name: 'Teil' }, ADMIN);
		const p = await payloadOf(
			db,
			csvBytes([
				['Werkzeug', 'Teil', 'owner'],
				['W-1', 'Deckel', 'ACME']
			]),
			'w.csv'
		);
		expect(p.mapping.dies).toEqual({ number: 'Werkzeug', part_name: 'Teil', owner: 'owner' });
	});

	it('refuses a file over 20 MB before reading it', async () => {
		const res = await readImportFile(new Uint8Array(MAX_IMPORT_BYTES + 1), 'big.csv');
		expect(res).toEqual({ ok: false, message: expect.stringContaining('up to 20 MB') });
	});
});

describe('progress of a running import seen from another app process', () => {
	const draft = (state: Draft['state'], heartbeatAt: string | null): Draft => ({
		id: 'f'.repeat(32),
		state,
		payload: {} as ImportPayload,
		progressDone: 250,
		progressTotal: 1000,
		heartbeatAt,
		result: null
	});
	const now = Date.parse('2026-06-10T12:00:00.000Z');

	it('shows the progress the writing process last stored while its heartbeat is fresh', () => {
		// 30 s old: within the 60 s the writer is given between heartbeats (it beats every 10 s).
		expect(importProgress(draft('running', '2026-06-10T11:59:30.000Z'), now)).toEqual({
			done: 250,
			total: 1000
		});
	});

	it('calls the import interrupted once the heartbeat is older than a minute, or missing', () => {
		expect(importProgress(draft('running', '2026-06-10T11:58:59.000Z'), now)).toBeNull();
		expect(importProgress(draft('running', null), now)).toBeNull();
		expect(importProgress(draft('done', '2026-06-10T11:59:59.000Z'), now)).toBeNull();
	});
});
