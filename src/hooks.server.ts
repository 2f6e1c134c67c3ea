import { json, text, type Handle, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { building } from '$app/environment';
import { CONTROL_CHARACTERS, CONTROL_CHARACTERS_MESSAGE } from '$lib/server/api/respond';
import { getLucia } from '$lib/server/auth';
import { getDb } from '$lib/server/db';
import { migrateToLatest } from '$lib/server/db/connect';
import { startNoticeCron } from '$lib/server/notices/cron';
import { startPressIdleCron } from '$lib/server/schedule/press-idle-cron';

export const init: ServerInit = async () => {
	if (building) return;
	const applied = await migrateToLatest(getDb());
	if (applied.length) console.log(`Castellan: applied migrations ${applied.join(', ')}`);
	// The notice job lives in the server process, once per process (NOTICE_CRON=off stops it).
	if (!building) startNoticeCron();
	// Running dies whose press has gone quiet go back to ready (PRESS_IDLE_CHECK=off stops it).
	startPressIdleCron();
};

const authenticate: Handle = async ({ event, resolve }) => {
	const lucia = getLucia();
	const sessionId = event.cookies.get(lucia.sessionCookieName);
	if (!sessionId) {
		event.locals.user = null;
		event.locals.session = null;
		return resolve(event);
	}
	const { session, user } = await lucia.validateSession(sessionId);
	if (session?.fresh) {
		const cookie = lucia.createSessionCookie(session.id);
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
	}
	if (!session) {
		const cookie = lucia.createBlankSessionCookie();
		event.cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes });
	}
	// A disabled account loses access at once, even with a live session.
	const active = user && user.active;
	event.locals.user = active ? user : null;
	event.locals.session = active ? session : null;
	return resolve(event);
};

const securityHeaders: Handle = async ({ event, resolve }) => {
	const response = await resolve(event);
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('X-Frame-Options', 'DENY');
	response.headers.set('Permissions-Policy', 'camera=(self), geolocation=(), microphone=()');
	return response;
};

// A form post carrying control characters is refused before any action sees it (the JSON API
// does the same in readJsonBody); multipart uploads are left to their own checks.
const refuseControlCharacters: Handle = async ({ event, resolve }) => {
	const type = event.request.headers.get('content-type') ?? '';
	if (event.request.method !== 'POST' || !type.startsWith('application/x-www-form-urlencoded')) {
		return resolve(event);
	}
	const fields = new URLSearchParams(await event.request.clone().text());
	const bad = [...fields].some(
		([k, v]) => CONTROL_CHARACTERS.test(k) || CONTROL_CHARACTERS.test(v)
	);
	if (!bad) return resolve(event);
	// A form sent by use:enhance expects an action result; a plain form post gets the sentence.
	if (event.request.headers.get('x-sveltekit-action') === 'true') {
		return json({ type: 'error', error: { message: CONTROL_CHARACTERS_MESSAGE } }, { status: 400 });
	}
	return text(CONTROL_CHARACTERS_MESSAGE, {
		status: 400,
		headers: { 'content-type': 'text/plain; charset=utf-8' }
	});
};

const requestLog: Handle = async ({ event, resolve }) => {
	const started = performance.now();
	const response = await resolve(event);
	if (process.env.CASTELLAN_LOG_REQUESTS === '1') {
		const ms = (performance.now() - started).toFixed(1);
		console.log(`${event.request.method} ${event.url.pathname} ${response.status} ${ms}ms`);
	}
	return response;
};

export const handle = sequence(requestLog, securityHeaders, refuseControlCharacters, authenticate);
