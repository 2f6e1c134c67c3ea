import { describe, expect, it } from 'vitest';
import {
	adoptMountedDie,
	changeDie,
	closeAllIntervals,
	emptyState,
	takeReading
} from '../../gateway/press-counters';

const t = (min: number) => new Date(Date.UTC(2026, 11, 3, 8, min)).toISOString();

describe('press gateway: counter readings to ledger intervals', () => {
	it('takes the first reading as the baseline and counts the advance after it', () => {
		const s = emptyState();
		changeDie(s, 'HC-80', 'D-0101', t(0));
		expect(takeReading(s, 'HC-80', 50_200, t(1))).toBe('baseline');
		expect(takeReading(s, 'HC-80', 50_260, t(2))).toBe('counted');
		expect(takeReading(s, 'HC-80', 50_512, t(3))).toBe('counted');
		expect(closeAllIntervals(s)).toBe(1);
		// One entry for the flush: 50 200 → 50 512 = 312 shots.
		expect(s.outbox).toEqual([
			{
				key: 'gw:HC-80:0:50200',
				press: 'HC-80',
				die: 'D-0101',
				counterStart: 50_200,
				counterEnd: 50_512,
				shots: 312,
				countedAt: t(3),
				resetFrom: null
			}
		]);
	});

	it('ignores a redelivered older reading instead of reading it as a reset', () => {
		const s = emptyState();
		changeDie(s, 'P1', 'D-1', t(0));
		takeReading(s, 'P1', 100, t(1));
		takeReading(s, 'P1', 130, t(3));
		expect(takeReading(s, 'P1', 120, t(2))).toBe('stale');
		expect(takeReading(s, 'P1', 130, t(3))).toBe('stale');
		closeAllIntervals(s);
		expect(s.outbox.map((e) => e.shots)).toEqual([30]);
	});

	it('starts a new interval from zero after a reset, in a new key epoch, never negative', () => {
		const s = emptyState();
		changeDie(s, 'P1', 'D-1', t(0));
		takeReading(s, 'P1', 900, t(1));
		takeReading(s, 'P1', 1_000, t(2));
		expect(takeReading(s, 'P1', 40, t(3))).toBe('reset');
		takeReading(s, 'P1', 70, t(4));
		closeAllIntervals(s);
		// 900 → 1 000 (100 shots) before the reset; 0 → 70 after it. Keys differ by epoch.
		expect(
			s.outbox.map((e) => [e.key, e.counterStart, e.counterEnd, e.shots, e.resetFrom])
		).toEqual([
			['gw:P1:0:900', 900, 1_000, 100, null],
			['gw:P1:1:0', 0, 70, 70, 1_000]
		]);
	});

	it('closes the interval at a die change, with the counter the change message carries', () => {
		const s = emptyState();
		changeDie(s, 'P1', 'D-1', t(0));
		takeReading(s, 'P1', 500, t(1));
		takeReading(s, 'P1', 520, t(2));
		changeDie(s, 'P1', 'D-2', t(3), 527);
		takeReading(s, 'P1', 540, t(4));
		closeAllIntervals(s);
		// D-1: 500 → 527 = 27 shots; D-2: 527 → 540 = 13 shots.
		expect(s.outbox.map((e) => [e.die, e.counterStart, e.counterEnd, e.shots])).toEqual([
			['D-1', 500, 527, 27],
			['D-2', 527, 540, 13]
		]);
	});

	it('keeps counts with no die as unassigned, and takes the die Castellan names', () => {
		const s = emptyState();
		takeReading(s, 'CC-400', 10, t(0));
		takeReading(s, 'CC-400', 14, t(1));
		closeAllIntervals(s);
		expect(s.outbox).toEqual([]);
		expect(s.unassigned.map((e) => e.shots)).toEqual([4]);
		takeReading(s, 'CC-400', 20, t(2));
		adoptMountedDie(s, 'CC-400', 'D-0147');
		closeAllIntervals(s);
		expect(s.outbox.map((e) => [e.die, e.shots])).toEqual([['D-0147', 6]]);
	});

	it('refuses readings that are not whole counts with a time', () => {
		const s = emptyState();
		expect(takeReading(s, 'P1', -1, t(0))).toBe('invalid');
		expect(takeReading(s, 'P1', 1.5, t(0))).toBe('invalid');
		expect(takeReading(s, 'P1', '12', t(0))).toBe('invalid');
		expect(takeReading(s, 'P1', 12, 'yesterday')).toBe('invalid');
		expect(s.presses).toEqual({});
	});
});

describe('press gateway: state file and journal', () => {
	it('rebuilds the state after a kill from the last state file plus the journal, replays twice harmlessly', async () => {
		const fs = await import('node:fs');
		const os = await import('node:os');
		const path = await import('node:path');
		const { Journal, loadState, saveState } = await import('../../gateway/state-file');
		const { applyRecord } = await import('../../gateway/press-counters');
		const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'gw-journal-'));
		const file = path.join(dir, 'state.json');
		try {
			const s = emptyState();
			applyRecord(s, { press: 'P1', kind: 'die', die: 'D-1', at: t(0) });
			applyRecord(s, { press: 'P1', kind: 'counter', counter: 100, at: t(1) });
			saveState(file, s);
			// Two messages journalled after the last state write, then the process dies.
			const j = new Journal(`${file}.journal`);
			j.append({ press: 'P1', kind: 'counter', counter: 130, at: t(2) });
			j.append({ press: 'P1', kind: 'counter', counter: 150, at: t(3) });
			j.close();
			const restored = loadState(file);
			expect(Journal.replay(`${file}.journal`, restored)).toBe(2);
			// Replaying again (a kill after the state write but before the journal was emptied).
			Journal.replay(`${file}.journal`, restored);
			closeAllIntervals(restored);
			// 100 → 150 = 50 shots, once.
			expect(restored.outbox.map((e) => [e.die, e.counterStart, e.counterEnd, e.shots])).toEqual([
				['D-1', 100, 150, 50]
			]);
		} finally {
			fs.rmSync(dir, { recursive: true, force: true });
		}
	});
});
