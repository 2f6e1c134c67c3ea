import type { Handle, ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { building } from '$app/environment';
import { getLucia } from '$lib/server/auth';
import { getDb } from '$lib/server/db';
import { migrateToLatest } from '$lib/server/db/connect';
import { startNoticeCron } from '$lib/server/notices/cron';

export const init: ServerInit = async () => {
	if (building) return;
	const applied = await migrateToLatest(getDb());
	if (applied.length) console.log(`Castellan: applied migrations ${applied.join(', ')}`);
	// The notice job lives in the server process, once per process (NOTICE_CRON=off stops it).
	if (!building) startNoticeCron();
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

const requestLog: Handle = async ({ event, resolve }) => {
	const started = performance.now();
	const response = await resolve(event);
	if (process.env.CASTELLAN_LOG_REQUESTS === '1') {
		const ms = (performance.now() - started).toFixed(1);
		console.log(`${event.request.method} ${event.url.pathname} ${response.status} ${ms}ms`);
	}
	return response;
};

export const handle = sequence(requestLog, securityHeaders, authenticate);
