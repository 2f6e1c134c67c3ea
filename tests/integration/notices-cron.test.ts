import { afterEach, describe, expect, it, vi } from 'vitest';
import { dateTimeInZone } from '../../src/lib/calc/zone';
import {
	nextNoticeRun,
	noticeSchedule,
	setNoticeCronZone,
	startNoticeCron,
	stopNoticeCron
} from '../../src/lib/server/notices/cron';

afterEach(async () => {
	await stopNoticeCron();
	vi.restoreAllMocks();
});

describe('startNoticeCron', () => {
	it('stays off when NOTICE_CRON=off', () => {
		vi.spyOn(console, 'log').mockImplementation(() => {});
		expect(startNoticeCron({ NOTICE_CRON: 'off' })).toBe(false);
	});

	it('refuses an expression that is not cron, without throwing', () => {
		const error = vi.spyOn(console, 'error').mockImplementation(() => {});
		expect(startNoticeCron({ NOTICE_CRON: 'every morning' })).toBe(false);
		expect(error).toHaveBeenCalledWith(expect.stringContaining('not a cron expression'));
	});

	it('starts once per process however often it is called', () => {
		const log = vi.spyOn(console, 'log').mockImplementation(() => {});
		const source = { NOTICE_CRON: '0 6 * * *', SMTP_URL: 'smtp://127.0.0.1:1' };
		expect(startNoticeCron(source)).toBe(true);
		expect(startNoticeCron(source)).toBe(true);
		const starts = log.mock.calls.filter(([line]) =>
			String(line).startsWith('Castellan notices: "')
		);
		expect(starts).toHaveLength(1);
	});

	it('runs at 06:00 on the plant clock, and follows a change of zone', async () => {
		vi.spyOn(console, 'log').mockImplementation(() => {});
		const source = { NOTICE_CRON: '0 6 * * *', SMTP_URL: 'smtp://127.0.0.1:1' };
		expect(startNoticeCron(source, 'Australia/Brisbane')).toBe(true);
		const brisbane = nextNoticeRun()!;
		expect(dateTimeInZone(brisbane, 'Australia/Brisbane').slice(11)).toBe('06:00');
		// Brisbane is UTC+10 all year: 06:00 there is 20:00 UTC the day before.
		expect(brisbane.toISOString().slice(11, 16)).toBe('20:00');
		await setNoticeCronZone('Europe/Vienna');
		const vienna = nextNoticeRun()!;
		expect(dateTimeInZone(vienna, 'Europe/Vienna').slice(11)).toBe('06:00');
		// Vienna is UTC+1 in winter and UTC+2 in summer: 05:00 or 04:00 UTC.
		expect(['05:00', '04:00']).toContain(vienna.toISOString().slice(11, 16));
	});
});

describe('noticeSchedule (issue 14 item 21: the outbox shows the next run)', () => {
	it('says off when the job is not running', () => {
		expect(noticeSchedule()).toEqual({ running: false, cron: null, nextRun: null });
	});

	it('gives the next 06:00 (server time) after now for "0 6 * * *"', () => {
		vi.spyOn(console, 'log').mockImplementation(() => {});
		startNoticeCron({ NOTICE_CRON: '0 6 * * *', SMTP_URL: 'smtp://127.0.0.1:1' });
		const schedule = noticeSchedule();
		expect(schedule.running).toBe(true);
		expect(schedule.cron).toBe('0 6 * * *');
		const next = new Date(schedule.nextRun!);
		// By hand: the first instant after now whose local clock reads 06:00:00.
		const expected = new Date();
		expected.setHours(6, 0, 0, 0);
		if (expected.getTime() <= Date.now()) expected.setDate(expected.getDate() + 1);
		expect(next.getTime()).toBe(expected.getTime());
	});
});
