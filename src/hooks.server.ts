import { json, text, type Handle, type RequestEvent, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { building } from '$app/environment';
import { CONTROL_CHARACTERS, CONTROL_CHARACTERS_MESSAGE } from '$lib/server/api/respond';
import { getLucia } from '$lib/server/auth';
import { closeDb, getDb } from '$lib/server/db';
import { migrateToLatest } from '$lib/server/db/connect';
import { startNoticeCron, stopNoticeCron } from '$lib/server/notices/cron';
import { getPlantTimeZone } from '$lib/server/settings/plant-time';
import {
	bodyLimitFor,
	refuseBodyByHeaders,
	SMALL_BODY_BYTES,
	takesPhotos
} from '$lib/server/http/body-limit';
import { getPhotoStore } from '$lib/server/photos';
import { UPLOADS_UNAVAILABLE } from '$lib/server/photos/upload-dir';
import { readTextCapped } from '$lib/server/http/read-capped';
import { startPressIdleCron, stopPressIdleCron } from '$lib/server/schedule/press-idle-cron';

export const init: ServerInit = async () => {
	if (building) return;
	const applied = await migrateToLatest(getDb());
	if (applied.length) console.log(`Castellan: applied migrations ${applied.join(', ')}`);
	console.log(`Castellan: plant time is ${await getPlantTimeZone(getDb())}.`);
	console.log(`Castellan: photos are kept in the ${getPhotoStore().where}.`);
	const photoProblem = await getPhotoStore().problem();
	if (photoProblem)
		console.error(`Castellan: ${photoProblem} Photo uploads answer 503 until then.`);
	// The notice job lives in the server process, once per process (NOTICE_CRON=off stops it).
	if (!building) startNoticeCron();
	// Running dies whose press has gone quiet go back to ready (PRESS_IDLE_CHECK=off stops it).
	startPressIdleCron();
	// adapter-node stops taking requests on SIGTERM/SIGINT, lets those in flight finish, then
	// emits this: stop the timers and close the database so the process ends by itself (a rolling
	// restart behind a load balancer waits for exactly that).
	process.once('sveltekit:shutdown', async () => {
		await Promise.allSettled([stopNoticeCron(), stopPressIdleCron()]);
		await closeDb();
	});
};

const authenticate: Handle = async ({ event, resolve }) => {
	const lucia = getLucia();
	const sessionId = event.cookies.get(lucia.sessionCookieName);
	event.locals.sessionEnded = false;
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
		// The browser still held a session that has expired or was ended: say so at sign-in.
		event.locals.sessionEnded = true;
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
	// Answers made for a signed-in caller (pages, JSON, CSV) stay out of shared and back-button
	// caches unless the route chose a life of its own (photos do).
	const personal = event.locals.user || event.request.headers.has('authorization');
	if (personal && !response.headers.has('cache-control')) {
		response.headers.set('cache-control', 'private, no-store');
	}
	return response;
};

/** A refusal in the shape the caller expects: an action result, API JSON or a plain sentence. */
function refuse(event: RequestEvent, status: number, message: string): Response {
	// A body refused unread stays on the socket: close it, or the client's next request on that
	// keep-alive connection would be read from the leftover bytes.
	const headers: Record<string, string> =
		status === 413 || status === 411 ? { connection: 'close' } : {};
	if (event.request.headers.get('x-sveltekit-action') === 'true') {
		return json({ type: 'error', error: { message } }, { status, headers });
	}
	if (event.url.pathname.startsWith('/api/')) return json({ error: message }, { status, headers });
	return text(message, {
		status,
		headers: { ...headers, 'content-type': 'text/plain; charset=utf-8' }
	});
}

// The body's size is judged from its headers before anything reads it: 1 MB for everyone, more
// only on the upload routes for the roles that may upload there (see body-limit.ts).
const limitRequestBody: Handle = async ({ event, resolve }) => {
	const method = event.request.method;
	if (method === 'GET' || method === 'HEAD' || method === 'OPTIONS') return resolve(event);
	const limit = bodyLimitFor(
		event.route.id,
		event.locals.user?.role ?? null,
		/^Bearer\s/i.test(event.request.headers.get('authorization') ?? '')
	);
	const refusal = refuseBodyByHeaders(event.request.headers, limit);
	return refusal ? refuse(event, refusal.status, refusal.message) : resolve(event);
};

// Photos are refused before their bytes are read when the photo store cannot be written: a plain
// 503 sentence instead of a 500 after a long upload.
const refuseUploadsWithoutStore: Handle = async ({ event, resolve }) => {
	const type = event.request.headers.get('content-type') ?? '';
	if (
		event.request.method === 'POST' &&
		type.startsWith('multipart/form-data') &&
		takesPhotos(event.route.id) &&
		(await getPhotoStore().problem())
	) {
		return refuse(event, 503, UPLOADS_UNAVAILABLE);
	}
	return resolve(event);
};

// A form post carrying control characters is refused before any action sees it (the JSON API
// does the same in readJsonBody); multipart uploads are left to their own checks. A url-encoded
// form is never large, so at most 1 MB of it is read here.
const refuseControlCharacters: Handle = async ({ event, resolve }) => {
	const type = event.request.headers.get('content-type') ?? '';
	if (event.request.method !== 'POST' || !type.startsWith('application/x-www-form-urlencoded')) {
		return resolve(event);
	}
	const body = await readTextCapped(event.request.clone(), SMALL_BODY_BYTES);
	if (body === null) {
		return refuse(event, 413, 'The form is too large: at most 1 MB may be sent.');
	}
	const fields = new URLSearchParams(body);
	const bad = [...fields].some(
		([k, v]) => CONTROL_CHARACTERS.test(k) || CONTROL_CHARACTERS.test(v)
	);
	return bad ? refuse(event, 400, CONTROL_CHARACTERS_MESSAGE) : resolve(event);
};

// SvelteKit throws a plain Error (a 500) for the reserved action name "default" in the query;
// it is simply an action that does not exist.
const refuseReservedActionName: Handle = async ({ event, resolve }) => {
	if (event.request.method === 'POST' && event.url.searchParams.has('/default')) {
		return refuse(event, 404, 'There is no form action called "default" here.');
	}
	return resolve(event);
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

// Every request reads the plant's zone (one row), so a change made by an admin in another server
// process shows here at once.
const plantTime: Handle = async ({ event, resolve }) => {
	await getPlantTimeZone(getDb());
	return resolve(event);
};

export const handle = sequence(
	requestLog,
	securityHeaders,
	plantTime,
	authenticate,
	limitRequestBody,
	refuseReservedActionName,
	refuseUploadsWithoutStore,
	refuseControlCharacters
);
