import nodemailer from 'nodemailer';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeMail, type FakeMail, type StoredMessage } from '../../fakes/mail/server';

let mail: FakeMail;
let transport: ReturnType<typeof nodemailer.createTransport>;

const inbox = (path = '') => `http://127.0.0.1:${mail.httpPort}${path}`;

beforeAll(async () => {
	mail = await startFakeMail({ smtpPort: 0, httpPort: 0 });
	transport = nodemailer.createTransport({ host: '127.0.0.1', port: mail.smtpPort, secure: false });
});

afterAll(async () => {
	transport.close();
	await mail.close();
});

beforeEach(() => mail.clear());

describe('fake mail server', () => {
	it('listens on free ports when asked for port 0', () => {
		expect(mail.smtpPort).toBeGreaterThan(0);
		expect(mail.httpPort).toBeGreaterThan(0);
		expect(mail.smtpPort).not.toBe(mail.httpPort);
	});

	it('stores a message sent over SMTP, with its text and HTML parts', async () => {
		await transport.sendMail({
			from: '"Castellan" <castellan@plant.test>',
			to: 'toolroom@plant.test',
			subject: 'Die 4711 due for service',
			text: 'Die 4711 has reached 95 % of its service interval.',
			html: '<p>Die <b>4711</b> has reached 95 % of its service interval.</p>'
		});

		const [message] = mail.messages();
		expect(mail.messages()).toHaveLength(1);
		expect(message).toMatchObject({
			from: '"Castellan" <castellan@plant.test>',
			to: ['toolroom@plant.test'],
			subject: 'Die 4711 due for service',
			text: 'Die 4711 has reached 95 % of its service interval.',
			html: '<p>Die <b>4711</b> has reached 95 % of its service interval.</p>'
		});
		expect(Number.isNaN(Date.parse(message.date))).toBe(false);
	});

	it('lists full messages as JSON over HTTP, newest first', async () => {
		await transport.sendMail({
			from: 'a@plant.test',
			to: 'b@plant.test',
			subject: 'first',
			text: '1'
		});
		await transport.sendMail({
			from: 'a@plant.test',
			to: 'b@plant.test',
			subject: 'second',
			text: '2',
			html: '<p>2</p>'
		});

		const response = await fetch(inbox('/api/messages'));
		expect(response.status).toBe(200);
		expect(response.headers.get('content-type')).toMatch(/^application\/json/);
		const listed = (await response.json()) as StoredMessage[];
		expect(listed.map((message) => message.subject)).toEqual(['second', 'first']);
		expect(listed[0]).toMatchObject({ text: '2', html: '<p>2</p>', to: ['b@plant.test'] });
		expect(listed).toEqual(mail.messages());

		const single = await fetch(inbox(`/api/messages/${listed[1].id}`));
		expect(await single.json()).toEqual(listed[1]);
		expect((await fetch(inbox('/api/messages/nope'))).status).toBe(404);
	});

	it('records Bcc recipients, which only the SMTP envelope knows', async () => {
		await transport.sendMail({
			from: 'a@plant.test',
			to: 'b@plant.test',
			bcc: 'audit@plant.test',
			subject: 'with bcc',
			text: 'x'
		});
		expect(mail.messages()[0].to.sort()).toEqual(['audit@plant.test', 'b@plant.test']);
	});

	it('escapes a <script> subject in the HTML inbox', async () => {
		await transport.sendMail({
			from: '"<img src=x onerror=alert(2)>" <evil@plant.test>',
			to: 'b@plant.test',
			subject: '<script>alert(1)</script>',
			text: 'x'
		});

		const response = await fetch(inbox('/'));
		expect(response.headers.get('content-type')).toMatch(/^text\/html/);
		const page = await response.text();
		expect(page).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
		expect(page).not.toMatch(/<script/i);
		expect(page).not.toMatch(/<img/i);
	});

	it('shows one message with its text in <pre> and its HTML only inside a sandboxed iframe', async () => {
		await transport.sendMail({
			from: 'a@plant.test',
			to: 'b@plant.test',
			subject: 'Layout check',
			text: 'Line 1\n<Line 2>',
			html: '<p onclick="steal()">Hello</p><script>steal()</script>'
		});
		const [message] = mail.messages();

		const page = await (await fetch(inbox(`/messages/${message.id}`))).text();
		expect(page).toContain('<pre>Line 1\n&lt;Line 2&gt;</pre>');
		expect(page).toMatch(
			/<iframe sandbox srcdoc="[^"]*&lt;script&gt;steal\(\)&lt;\/script&gt;[^"]*"/
		);
		expect(page).not.toMatch(/<script/i);
		expect(page).not.toContain('<p onclick');
		expect((await fetch(inbox('/messages/999999'))).status).toBe(404);
	});

	it('empties the inbox on DELETE /api/messages', async () => {
		await transport.sendMail({ from: 'a@plant.test', to: 'b@plant.test', subject: 's', text: 'x' });
		expect(mail.messages()).toHaveLength(1);

		const response = await fetch(inbox('/api/messages'), { method: 'DELETE' });
		expect(response.status).toBe(204);
		expect(mail.messages()).toEqual([]);
		expect(await (await fetch(inbox('/api/messages'))).json()).toEqual([]);
	});

	it('keeps only the newest 500 messages', async () => {
		const pooled = nodemailer.createTransport({
			host: '127.0.0.1',
			port: mail.smtpPort,
			pool: true,
			maxMessages: Infinity
		});
		try {
			for (let batch = 0; batch < 501; batch += 50) {
				const sends = [];
				for (let n = batch; n < Math.min(batch + 50, 501); n++) {
					sends.push(
						pooled.sendMail({
							from: 'a@plant.test',
							to: 'b@plant.test',
							subject: `#${n}`,
							text: 'x'
						})
					);
				}
				await Promise.all(sends);
			}
		} finally {
			pooled.close();
		}
		const subjects = new Set(mail.messages().map((message) => message.subject));
		expect(subjects.size).toBe(500);
		expect(subjects.has('#500')).toBe(true);
		expect(subjects.has('#0')).toBe(false);
	});

	it('refuses a message over 10 MB and does not store it', async () => {
		const attachment = Buffer.alloc(11 * 1024 * 1024, 'a');
		await expect(
			transport.sendMail({
				from: 'a@plant.test',
				to: 'b@plant.test',
				subject: 'too big',
				text: 'x',
				attachments: [{ filename: 'big.txt', content: attachment }]
			})
		).rejects.toThrow(/552|size/i);
		expect(mail.messages()).toEqual([]);
	});
});
