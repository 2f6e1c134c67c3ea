// Issue 14, item 13: `npm run demo` starts the fake mail server on FAKE_MAIL_SMTP_PORT /
// FAKE_MAIL_HTTP_PORT and points the app's SMTP_URL at the port really used.
import fs from 'node:fs';
import { describe, expect, test } from 'vitest';
import { fakeMailPortsFromEnv, startFakeMail } from '../../fakes/mail/server';

describe('item 13: fake mail ports', () => {
	test('the ports come from the environment, 2525 and 8025 when unset; nonsense is refused', () => {
		expect(fakeMailPortsFromEnv({})).toEqual({ smtpPort: 2525, httpPort: 8025 });
		expect(
			fakeMailPortsFromEnv({ FAKE_MAIL_SMTP_PORT: '2627', FAKE_MAIL_HTTP_PORT: '8127' })
		).toEqual({ smtpPort: 2627, httpPort: 8127 });
		expect(() => fakeMailPortsFromEnv({ FAKE_MAIL_SMTP_PORT: 'smtp' })).toThrow(/port number/);
	});

	test('the fake listens where the environment says', async () => {
		const mail = await startFakeMail(
			fakeMailPortsFromEnv({ FAKE_MAIL_SMTP_PORT: '2691', FAKE_MAIL_HTTP_PORT: '8191' })
		);
		try {
			expect([mail.smtpPort, mail.httpPort]).toEqual([2691, 8191]);
			const res = await fetch('http://127.0.0.1:8191/');
			expect(res.status).toBe(200);
		} finally {
			await mail.close();
		}
	});

	test('the demo script starts the fake with those ports and mails the port it got', () => {
		const demo = fs.readFileSync('scripts/demo.ts', 'utf8');
		expect(demo).toContain('startFakeMail(fakeMailPortsFromEnv())');
		expect(demo).toMatch(
			/SMTP_URL:\s+process\.env\.SMTP_URL \?\?\s+`smtp:\/\/127\.0\.0\.1:\$\{mail\?\.smtpPort/
		);
		expect(demo).not.toContain("'smtp://127.0.0.1:2525'");
	});
});
