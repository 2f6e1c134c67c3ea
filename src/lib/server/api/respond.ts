import { json, type RequestEvent } from '@sveltejs/kit';

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

/** Reads a JSON body with a size cap and a clear answer for malformed input. */
export async function readJsonBody(request: Request, maxBytes = 2_000_000): Promise<unknown> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.toLowerCase().startsWith('application/json')) {
		throw new ApiError(415, 'Send the body as application/json.');
	}
	const text = await request.text();
	if (Buffer.byteLength(text) > maxBytes) {
		throw new ApiError(413, `The body is larger than ${Math.round(maxBytes / 1e6)} MB.`);
	}
	try {
		return JSON.parse(text);
	} catch {
		throw new ApiError(400, 'The body is not valid JSON.');
	}
}
