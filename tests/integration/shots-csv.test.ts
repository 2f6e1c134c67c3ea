import { beforeEach, describe, expect, test } from 'vitest';
import {
	commitShotCsv,
	deriveRowKey,
	parseShotCsv,
	previewShotCsv
} from '../../src/lib/server/shots/csv-upload';
import { ledgerState, makeShotPlant, NOW, plant, snapshot, type ShotPlant } from './shots-fixture';

let p: ShotPlant;
beforeEach(async () => {
	p = await makeShotPlant();
});

const ok = (text: string) => {
	const parsed = parseShotCsv(text);
	if (!parsed.ok) throw new Error(parsed.message);
	return parsed;
};

describe('reading the file', () => {
	test('comma file with BOM and CRLF; quoted note with a comma; shots from counters', () => {
		const parsed = ok(
			'\uFEFFdie,counted_at,shots,counter_start,counter_end,press,note\r\n' +
				'z-0001,2026-06-10 08:00,120,,,HC-08,"first run, shift A"\r\n' +
				'A-0001,2026-06-10T09:00:00+02:00,,1000,1180,CC-84,\r\n'
		);
		expect(parsed.delimiter).toBe(',');
		expect(parsed.rows.map((r) => r.input)).toEqual([
			expect.objectContaining({
				die: 'Z-0001',
				shots: 120,
				countedAt: '2026-06-10T08:00:00.000Z',
				machine: 'HC-08',
				note: 'first run, shift A'
			}),
			expect.objectContaining({
				die: 'A-0001',
				shots: 180,
				countedAt: '2026-06-10T07:00:00.000Z',
				counterStart: 1000,
				counterEnd: 1180
			})
		]);
		expect(parsed.rows.map((r) => r.line)).toEqual([2, 3]);
	});

	test('semicolon file (spreadsheet locale) without BOM; header names in any case; alias machine', () => {
		const parsed = ok('Die;Counted At;Shots;Machine\nZ-0001;2026-06-10 08:00;1 200;HC-08\n\n');
		expect(parsed.delimiter).toBe(';');
		expect(parsed.rows).toHaveLength(1);
		expect(parsed.rows[0].input).toMatchObject({ die: 'Z-0001', shots: 1200, machine: 'HC-08' });
	});

	test('bad rows keep their line and a reason; the rest still reads', () => {
		const parsed = ok(
			[
				'die,counted_at,shots,counter_start,counter_end',
				',2026-06-10 08:00,10,,',
				'Z-0001,,10,,',
				'Z-0001,10/06/2026,10,,',
				'Z-0001,2026-06-10 08:00,12.5,,',
				'Z-0001,2026-06-10 08:00,,100,',
				'Z-0001,2026-06-10 08:00,,,',
				'Z-0001,2026-06-10 08:00,10,,'
			].join('\n')
		);
		expect(
			parsed.rows.map((r) => [r.line, r.problem?.column ?? null, r.problem?.message ?? null])
		).toEqual([
			[2, 'die', 'The die is missing.'],
			[3, 'counted_at', 'counted_at is missing.'],
			[
				4,
				'counted_at',
				'"10/06/2026" is not a date and time at the plant (use 2026-03-01 14:30, plant time).'
			],
			[5, 'shots', 'Shots must be a whole number (found "12.5").'],
			[6, 'counter_end', 'Give both counter readings, or shots.'],
			[7, 'shots', 'Give shots, or counter_start and counter_end.'],
			[8, null, null]
		]);
	});

	test('file-level problems come back as one clear message', () => {
		const fail = (text: string) => {
			const r = parseShotCsv(text);
			expect(r.ok).toBe(false);
			return r.ok ? '' : r.message;
		};
		expect(fail('')).toBe('The file is empty.');
		expect(fail('\uFEFF  \n')).toBe('The file is empty.');
		expect(fail('die,when,shots\nZ-0001,2026-06-10,5')).toMatch(
			/^The header row lacks counted_at\./
		);
		expect(fail('die,counted_at,counter_start\nZ-0001,2026-06-10,5')).toMatch(
			/lacks shots \(or counter_start and counter_end\)/
		);
		expect(fail('die,counted_at,shots\n')).toBe('The file has a header row but no data rows.');
		expect(fail('die,counted_at,shots\nZ-0001,"2026-06-10,5\n')).toMatch(
			/^The file is not readable as CSV/
		);
		const many = 'die,counted_at,shots\n' + 'Z-0001,2026-06-10 08:00,1\n'.repeat(5001);
		// Reading stops at the first row past the limit, so the count is not known (issue 14 item 12).
		expect(fail(many)).toBe(
			'The file has more than 5000 data rows; upload at most 5000 at a time.'
		);
		const huge =
			'die,counted_at,shots,note\n' +
			`Z-0001,2026-06-10 08:00,1,${'x'.repeat(1000)}\n`.repeat(2100);
		expect(fail(huge)).toBe('The file is larger than 2 MB. Split it into smaller files.');
	});

	test('the derived key depends on the reading, not on how the file spelled it', () => {
		const a = ok('die,counted_at,shots,press\nz-0001,2026-06-10 08:00,120,hc-08').rows[0].input!;
		const b = ok('die;counted_at;shots;press\nZ-0001;2026-06-10T08:00:00Z;120;HC-08').rows[0]
			.input!;
		const c = ok('die,counted_at,shots,press\nZ-0001,2026-06-10 08:00,121,HC-08').rows[0].input!;
		expect(a.key).toBe(b.key);
		expect(a.key).not.toBe(c.key);
		expect(a.key).toBe(
			deriveRowKey({
				die: 'Z-0001',
				countedAt: '2026-06-10T08:00:00.000Z',
				shots: 120,
				counterStart: null,
				counterEnd: null,
				press: 'HC-08'
			})
		);
		expect(
			ok('die,counted_at,shots,key\nZ-0001,2026-06-10 08:00,120,gw-88').rows[0].input!.key
		).toBe('gw-88');
	});
});

describe('preview and commit', () => {
	const FILE = [
		'die;counted_at;shots;press',
		'Z-0001;2026-06-10 08:00;400;HC-08',
		'A-0001;2026-06-10 08:00;150;CC-84',
		'R-0001;2026-06-10 08:00;150;CC-84',
		'A-0001;2026-06-10 09:00;150;CC-99'
	].join('\n');

	test('each row is marked valid or wrong with the reason; nothing is written', async () => {
		const before = await snapshot(p.db);
		const { preview } = await previewShotCsv(p.db, ok(FILE), plant, NOW);
		expect(preview.rows.map((r) => [r.line, r.status, r.column, r.reason])).toEqual([
			[2, 'valid', null, null],
			[3, 'valid', null, null],
			[4, 'wrong', 'die', 'Die R-0001 is retired and takes no more shots.'],
			[5, 'wrong', 'press', 'There is no press called CC-99.']
		]);
		expect(preview).toMatchObject({ valid: 2, wrong: 2, duplicates: 0, shots: 550 });
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('commit counts the valid rows; re-uploading the same file counts nothing twice', async () => {
		const first = await commitShotCsv(p.db, FILE, 2, plant, NOW);
		expect(first).toMatchObject({ ok: true, counted: 2, duplicates: 0, shots: 550 });
		expect((await ledgerState(p.db, p.dies.zinc)).total).toBe(400);
		expect((await ledgerState(p.db, p.dies.alu)).total).toBe(150);

		// The fixed file: the press typo corrected, the retired die's row removed.
		const fixed = FILE.replace('CC-99', 'CC-84').replace(/\nR-0001[^\n]*/, '');
		const { preview } = await previewShotCsv(p.db, ok(fixed), plant, NOW);
		expect(preview.rows.map((r) => r.status)).toEqual(['duplicate', 'duplicate', 'valid']);
		const second = await commitShotCsv(p.db, fixed, 1, plant, NOW);
		expect(second).toMatchObject({ ok: true, counted: 1, duplicates: 2, shots: 150 });
		const again = await commitShotCsv(p.db, fixed, 0, plant, NOW);
		expect(again).toMatchObject({ ok: false, message: 'No row is left to count.' });

		const alu = await ledgerState(p.db, p.dies.alu);
		expect(alu).toMatchObject({ total: 300, ledgerSum: 300, dailySum: 300, entries: 2 });
		const sources = await p.db.selectFrom('shot_entries').select('source').distinct().execute();
		expect(sources).toEqual([{ source: 'csv' }]);
	});

	test('a commit whose rows differ from the preview shows the new preview and counts nothing', async () => {
		const before = await snapshot(p.db);
		const r = await commitShotCsv(p.db, FILE, 3, plant, NOW);
		expect(r).toMatchObject({
			ok: false,
			message: expect.stringMatching(/changed since the preview \(2 valid now, 3 before\)/)
		});
		expect(r.ok === false && r.preview?.valid).toBe(2);
		expect(await snapshot(p.db)).toEqual(before);
	});

	test('two identical rows in one file: the second is wrong, not silently merged', async () => {
		const text = 'die,counted_at,shots\nZ-0001,2026-06-10 08:00,100\nZ-0001,2026-06-10 08:00,100';
		const { preview } = await previewShotCsv(p.db, ok(text), plant, NOW);
		expect(preview.rows.map((r) => [r.status, r.reason])).toEqual([
			['valid', null],
			['wrong', 'Repeats an earlier row of this file (same die, time, count and press).']
		]);
	});
});
