import { json, type RequestEvent } from '@sveltejs/kit';
import { readTextCapped } from '../http/read-capped';

export interface ApiIssue {
	index?: number;
	field: string;
	message: string;
}

/** An error the API answers as `{ error, issues? }` with its status; never a stack trace. */
export class ApiError extends Error {
	constructor(
		public status: number,
		message: string,
		public issues?: ApiIssue[]
	) {
		super(message);
	}
}

export function apiErrorResponse(err: ApiError): Response {
	return json(err.issues ? { error: err.message, issues: err.issues } : { error: err.message }, {
		status: err.status
	});
}

/** Wraps an API handler so ApiErrors become JSON answers and anything else a plain 500. */
export function apiRoute<E extends RequestEvent>(handler: (event: E) => Promise<Response>) {
	return async (event: E): Promise<Response> => {
		try {
			return await handler(event);
		} catch (err) {
			if (err instanceof ApiError) return apiErrorResponse(err);
			console.error(`API ${event.request.method} ${event.url.pathname} failed`, err);
			return json({ error: 'Internal error. The request was not applied.' }, { status: 500 });
		}
	};
}

/**
 * C0 control characters other than tab, line feed and carriage return, and DEL. Nobody types
 * them; pasted or forged, they vanish in the browser, break CSV cells and mail headers.
 */
// eslint-disable-next-line no-control-regex -- matching control characters is the point
export const CONTROL_CHARACTERS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;
export const CONTROL_CHARACTERS_MESSAGE =
	'Text may not contain control characters such as NUL; remove them and send again.';

/** True when any string (key or value) in a parsed JSON value holds a control character. */
export function hasControlCharacters(value: unknown): boolean {
	// Iterative, so a deeply nested body cannot overflow the stack.
	const pending: unknown[] = [value];
	while (pending.length) {
		const v = pending.pop();
		if (typeof v === 'string') {
			if (CONTROL_CHARACTERS.test(v)) return true;
		} else if (v && typeof v === 'object') {
			for (const [key, inner] of Object.entries(v)) {
				if (CONTROL_CHARACTERS.test(key)) return true;
				pending.push(inner);
			}
		}
	}
	return false;
}

/** Reads a JSON body with a size cap and a clear answer for malformed input. */
export async function readJsonBody(request: Request, maxBytes = 2_000_000): Promise<unknown> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.toLowerCase().startsWith('application/json')) {
		throw new ApiError(415, 'Send the body as application/json.');
	}
	// Stops reading at the cap instead of buffering whatever was sent.
	const text = await readTextCapped(request, maxBytes);
	if (text === null) {
		const size =
			maxBytes >= 1e6 ? `${Math.round(maxBytes / 1e6)} MB` : `${Math.round(maxBytes / 1e3)} kB`;
		throw new ApiError(413, `The body is larger than ${size}.`);
	}
	let body: unknown;
	try {
		body = JSON.parse(text);
	} catch {
		throw new ApiError(400, 'The body is not valid JSON.');
	}
	if (hasControlCharacters(body)) throw new ApiError(400, CONTROL_CHARACTERS_MESSAGE);
	return body;
}
