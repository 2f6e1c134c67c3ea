import { afterEach, describe, expect, it, vi } from 'vitest';
import { startNoticeCron, stopNoticeCron } from '../../src/lib/server/notices/cron';

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
});
