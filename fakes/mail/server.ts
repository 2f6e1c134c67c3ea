/**
 * Fake mail relay for development and tests: accepts any message over SMTP, keeps the latest
 * ones in memory and shows them in a small web inbox (and as JSON for tests).
 *
 *   npm run fake:mail            SMTP on 127.0.0.1:2525, inbox on http://127.0.0.1:8025
 *   FAKE_MAIL_SMTP_PORT / FAKE_MAIL_HTTP_PORT override the ports.
 *
 * Self-contained on purpose (nothing imported from src/): it stands in for a hosted service.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo, Server } from 'node:net';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import { SMTPServer, type SMTPServerSession } from 'smtp-server';
import { isEntryPoint } from '../entry-point';

export interface StoredMessage {
	id: string;
	/** From header as written, e.g. `"Castellan" <noreply@example.com>`. */
	from: string;
	/** Every address the message was delivered to (SMTP envelope, so Bcc included). */
	to: string[];
	subject: string;
	/** ISO-8601: the Date header, or the time of receipt when there is none. */
	date: string;
	text: string;
	html: string | null;
}

export interface FakeMailOptions {
	/** 0 picks a free port; the one in use is on the returned object. */
	smtpPort?: number;
	httpPort?: number;
	host?: string;
}

export interface FakeMail {
	smtpPort: number;
	httpPort: number;
	/** Newest first. */
	messages(): StoredMessage[];
	clear(): void;
	close(): Promise<void>;
}

const MAX_MESSAGES = 500;
const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

function escapeHtml(value: string): string {
	return value
		.replaceAll('&', '&amp;')
		.replaceAll('<', '&lt;')
		.replaceAll('>', '&gt;')
		.replaceAll('"', '&quot;')
		.replaceAll("'", '&#39;');
}

function addressList(field: AddressObject | AddressObject[] | undefined): string[] {
	const objects = field === undefined ? [] : Array.isArray(field) ? field : [field];
	return objects.flatMap((object) => object.value.map((entry) => entry.address ?? entry.name));
}

function toStoredMessage(
	id: string,
	parsed: ParsedMail,
	session: SMTPServerSession
): StoredMessage {
	const envelopeTo = session.envelope.rcptTo.map((recipient) => recipient.address);
	const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
	return {
		id,
		from: parsed.from?.text ?? envelopeFrom,
		to: envelopeTo.length > 0 ? envelopeTo : addressList(parsed.to),
		subject: parsed.subject ?? '',
		date: (parsed.date ?? new Date()).toISOString(),
		text: parsed.text ?? '',
		html: parsed.html || null
	};
}

// Inline styles only, and nothing from the message is ever trusted: it is escaped everywhere,
// and its HTML part renders in a sandboxed iframe (no scripts, no same-origin access).
const PAGE_STYLE = `
	body { font: 14px/1.45 system-ui, sans-serif; margin: 0; color: #1f2328; background: #f4f5f6; }
	header { background: #2b3139; color: #fff; padding: 12px 20px; border-bottom: 3px solid #e8711c; }
	header a { color: #fff; text-decoration: none; font-weight: 600; }
	main { padding: 20px; max-width: 1100px; }
	table { border-collapse: collapse; width: 100%; background: #fff; }
	th, td { text-align: left; padding: 6px 10px; border-bottom: 1px solid #dde1e5; vertical-align: top; }
	th { background: #eceef0; font-weight: 600; }
	td.date { white-space: nowrap; color: #57606a; }
	dl { display: grid; grid-template-columns: max-content 1fr; gap: 4px 12px; }
	dt { color: #57606a; }
	pre { background: #fff; border: 1px solid #dde1e5; padding: 12px; white-space: pre-wrap; }
	iframe { width: 100%; height: 600px; border: 1px solid #dde1e5; background: #fff; }
	.empty { color: #57606a; }
`;

function page(title: string, body: string, refreshSeconds?: number): string {
	const refresh = refreshSeconds ? `<meta http-equiv="refresh" content="${refreshSeconds}">` : '';
	return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
${refresh}
<title>${escapeHtml(title)}</title>
<style>${PAGE_STYLE}</style>
</head>
<body>
<header><a href="/">Fake mail inbox</a></header>
<main>${body}</main>
</body>
</html>`;
}

function inboxPage(messages: StoredMessage[]): string {
	if (messages.length === 0) {
		return page('Fake mail', '<p class="empty">No messages yet.</p>', 5);
	}
	const rows = messages
		.map(
			(message) => `<tr>
<td class="date">${escapeHtml(message.date)}</td>
<td>${escapeHtml(message.from)}</td>
<td>${escapeHtml(message.to.join(', '))}</td>
<td><a href="/messages/${encodeURIComponent(message.id)}">${escapeHtml(message.subject || '(no subject)')}</a></td>
</tr>`
		)
		.join('\n');
	const table = `<table>
<thead><tr><th>Date</th><th>From</th><th>To</th><th>Subject</th></tr></thead>
<tbody>
${rows}
</tbody>
</table>`;
	return page(`Fake mail (${messages.length})`, table, 5);
}

function messagePage(message: StoredMessage): string {
	const html =
		message.html === null
			? '<p class="empty">No HTML part.</p>'
			: `<iframe sandbox srcdoc="${escapeHtml(message.html)}" title="HTML part"></iframe>`;
	return page(
		message.subject || '(no subject)',
		`<h1>${escapeHtml(message.subject || '(no subject)')}</h1>
<dl>
<dt>From</dt><dd>${escapeHtml(message.from)}</dd>
<dt>To</dt><dd>${escapeHtml(message.to.join(', '))}</dd>
<dt>Date</dt><dd>${escapeHtml(message.date)}</dd>
</dl>
<h2>Text</h2>
<pre>${escapeHtml(message.text)}</pre>
<h2>HTML</h2>
${html}`
	);
}

function send(
	res: ServerResponse,
	status: number,
	body: string,
	contentType = 'text/plain; charset=utf-8'
) {
	res.writeHead(status, {
		'Content-Type': contentType,
		'Cache-Control': 'no-store',
		'X-Content-Type-Options': 'nosniff',
		// The srcdoc iframe inherits this policy, so mail HTML can style itself and show images
		// but never run script or load anything else.
		'Content-Security-Policy': "default-src 'none'; style-src 'unsafe-inline'; img-src * data:"
	});
	res.end(body);
}

function sendJson(res: ServerResponse, status: number, value: unknown) {
	send(res, status, JSON.stringify(value), 'application/json; charset=utf-8');
}

function listen(server: Server, port: number, host: string): Promise<void> {
	return new Promise((resolve, reject) => {
		server.once('error', reject);
		server.listen(port, host, () => {
			server.off('error', reject);
			resolve();
		});
	});
}

export async function startFakeMail({
	smtpPort = 2525,
	httpPort = 8025,
	host = '127.0.0.1'
}: FakeMailOptions = {}): Promise<FakeMail> {
	let stored: StoredMessage[] = [];
	let nextId = 1;

	const smtp = new SMTPServer({
		banner: 'Castellan fake mail',
		authOptional: true,
		// Accept whatever credentials an app configured for a real relay sends, over plain text.
		allowInsecureAuth: true,
		onAuth(auth, _session, callback) {
			callback(null, { user: auth.username ?? 'anonymous' });
		},
		disabledCommands: ['STARTTLS'],
		size: MAX_MESSAGE_BYTES,
		rejectOversized: true,
		logger: false,
		// Tests close the server right after sending; do not wait 30 s for idle connections.
		closeTimeout: 1000,
		onData(stream, session, callback) {
			simpleParser(stream).then(
				(parsed) => {
					// Oversized mail is answered with 552 by the server itself; just do not keep it.
					if (!stream.sizeExceeded) {
						stored.unshift(toStoredMessage(String(nextId++), parsed, session));
						if (stored.length > MAX_MESSAGES) stored.length = MAX_MESSAGES;
					}
					callback();
				},
				(error: Error) => callback(error)
			);
		}
	});
	smtp.on('error', (error) => console.error('Fake mail SMTP error:', error.message));

	const html = (res: ServerResponse, status: number, body: string) =>
		send(res, status, body, 'text/html; charset=utf-8');

	const http = createServer((req: IncomingMessage, res: ServerResponse) => {
		const { pathname } = new URL(req.url ?? '/', 'http://fake-mail');
		const method = req.method ?? 'GET';
		const allow = (methods: string) => {
			res.setHeader('Allow', methods);
			send(res, 405, 'Method not allowed');
		};

		if (pathname === '/favicon.ico') {
			res.writeHead(204).end(); // keeps the browser console free of a 404 on every page
			return;
		}
		if (pathname === '/') {
			return method === 'GET' ? html(res, 200, inboxPage(stored)) : allow('GET');
		}
		if (pathname === '/api/messages') {
			if (method === 'GET') return sendJson(res, 200, stored);
			if (method !== 'DELETE') return allow('GET, DELETE');
			stored = [];
			res.writeHead(204).end();
			return;
		}
		const match = /^\/(api\/)?messages\/([^/]+)$/.exec(pathname);
		if (!match) return send(res, 404, 'Not found');
		if (method !== 'GET') return allow('GET');
		const [, api, id] = match;
		const message = stored.find((candidate) => candidate.id === decodeURIComponent(id));
		if (api) {
			return message
				? sendJson(res, 200, message)
				: sendJson(res, 404, { error: 'No such message' });
		}
		return message
			? html(res, 200, messagePage(message))
			: html(
					res,
					404,
					page('Not found', '<p>No such message; the inbox keeps the latest 500.</p>')
				);
	});

	await listen(smtp.server, smtpPort, host);
	try {
		await listen(http, httpPort, host);
	} catch (error) {
		await new Promise<void>((resolve) => smtp.close(resolve));
		throw error;
	}

	return {
		smtpPort: (smtp.server.address() as AddressInfo).port,
		httpPort: (http.address() as AddressInfo).port,
		messages: () => [...stored],
		clear: () => {
			stored = [];
		},
		close: async () => {
			http.closeAllConnections();
			await Promise.all([
				new Promise<void>((resolve) => http.close(() => resolve())),
				new Promise<void>((resolve) => smtp.close(() => resolve()))
			]);
		}
	};
}

function portFromEnv(
	env: Record<string, string | undefined>,
	name: string,
	fallback: number
): number {
	const raw = env[name];
	if (raw === undefined || raw === '') return fallback;
	const port = Number(raw);
	if (!Number.isInteger(port) || port < 0 || port > 65535) {
		throw new Error(`${name} must be a port number (0–65535), not "${raw}".`);
	}
	return port;
}

/**
 * The fake's ports from FAKE_MAIL_SMTP_PORT / FAKE_MAIL_HTTP_PORT (2525 and 8025 when unset), for
 * `npm run fake:mail` and `npm run demo` alike.
 */
export function fakeMailPortsFromEnv(env: Record<string, string | undefined> = process.env) {
	return {
		smtpPort: portFromEnv(env, 'FAKE_MAIL_SMTP_PORT', 2525),
		httpPort: portFromEnv(env, 'FAKE_MAIL_HTTP_PORT', 8025)
	};
}

if (isEntryPoint(import.meta.url)) {
	const host = '127.0.0.1';
	const mail = await startFakeMail({ ...fakeMailPortsFromEnv(), host });
	console.log(
		`Fake mail: SMTP smtp://${host}:${mail.smtpPort}, inbox http://${host}:${mail.httpPort}`
	);
	const stop = () => {
		mail.close().then(
			() => process.exit(0),
			() => process.exit(1)
		);
	};
	process.once('SIGINT', stop);
	process.once('SIGTERM', stop);
}
