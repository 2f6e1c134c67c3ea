import { describe, expect, it } from 'vitest';
import { readNoticeConfig } from '../../src/lib/server/notices/config';
import {
	composeDigest,
	MAX_LISTED_ITEMS,
	type DigestEntry
} from '../../src/lib/server/notices/digest';
import { backoffMs, BACKOFF_BASE_MS, BACKOFF_MAX_MS } from '../../src/lib/server/notices/send';
import type { ServicePayload } from '../../src/lib/server/notices/types';

function serviceEntry(n: number, state: ServicePayload['state']): DigestEntry {
	const dieNumber = `D-${String(n).padStart(4, '0')}`;
	return {
		level: state,
		subject: `${dieNumber} · Stress relief · ${state}`,
		dieNumber,
		payload: {
			kind: 'service',
			dieNumber,
			partName: `Part ${n}`,
			customerName: 'Testbury',
			taskId: n,
			taskKind: 'stress_relief',
			state,
			fraction: 1.2,
			intervalShots: 15_000,
			intervalDays: null,
			shotsRemaining: -3_000,
			daysRemaining: null,
			lastDoneAt: '2026-01-01T00:00:00.000Z'
		}
	};
}

describe('composeDigest', () => {
	it('lists the worst items of a large backlog and counts the rest', () => {
		const entries = [
			...Array.from({ length: 150 }, (_, i) => serviceEntry(i + 1, 'due')),
			...Array.from({ length: 150 }, (_, i) => serviceEntry(i + 501, 'overdue'))
		];
		const mail = composeDigest(entries, {
			origin: 'https://c.test/',
			asOf: '2026-03-02T06:00:00Z'
		});
		expect(mail.subject).toBe('Castellan service notice: 150 overdue, 150 due');
		// One block per die; 300 dies, the first MAX_LISTED_ITEMS listed.
		const listed = mail.text.match(/^- D-\d{4} /gm) ?? [];
		expect(listed).toHaveLength(MAX_LISTED_ITEMS);
		// Every overdue die is listed before any due one.
		expect(mail.text).toContain('- D-0650 ');
		expect(mail.text).toContain(`… and ${300 - MAX_LISTED_ITEMS} more dies.`);
		expect(mail.text).toContain('https://c.test/toolroom');
		expect(mail.html).toContain('href="https://c.test/dies/D-0501"');
	});

	it('says how far past an interval a task is in plain words', () => {
		const entry = serviceEntry(1, 'due');
		Object.assign(entry.payload, { shotsRemaining: -1, daysRemaining: -0.4, intervalDays: 30 });
		const mail = composeDigest([entry], { origin: 'https://c.test', asOf: '2026-03-02T06:00:00Z' });
		expect(mail.subject).toBe('Castellan: D-0001 · Stress relief · due');
		expect(mail.text).toContain(
			'Stress relief: 120 % of its interval, 1 shot past, under a day past'
		);
	});
});

describe('backoffMs', () => {
	it('doubles from the base after each failure up to the cap', () => {
		expect([1, 2, 3, 4].map(backoffMs)).toEqual([1, 2, 4, 8].map((k) => k * BACKOFF_BASE_MS));
		expect(backoffMs(20)).toBe(BACKOFF_MAX_MS);
	});
});

describe('readNoticeConfig', () => {
	it('uses the documented defaults', () => {
		expect(readNoticeConfig({})).toEqual({
			smtpUrl: 'smtp://127.0.0.1:2525',
			from: 'Castellan <castellan@localhost>',
			origin: 'http://localhost:3000',
			threshold: 0.9,
			cron: '0 6 * * *'
		});
	});

	it('switches the job off, trims the origin and refuses a threshold outside (0, 1]', () => {
		const config = readNoticeConfig({
			NOTICE_CRON: 'OFF',
			ORIGIN: 'https://castellan.plant.test/',
			NOTICE_THRESHOLD: '1.5'
		});
		expect(config).toMatchObject({
			cron: null,
			origin: 'https://castellan.plant.test',
			threshold: 0.9
		});
		expect(readNoticeConfig({ NOTICE_THRESHOLD: '0.8' }).threshold).toBe(0.8);
	});
});
