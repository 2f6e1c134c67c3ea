import { SHOT_RECORDERS, type RoleName } from '../../roles';
import { TOOLROOM_WORKERS } from '../toolroom/access';

/** What any request may send, signed in or not: forms and JSON are far smaller. */
export const SMALL_BODY_BYTES = 1_000_000;
/** Photo posts carry up to 10 photos of 20 MB each (adapter-node's BODY_SIZE_LIMIT is the ceiling). */
export const PHOTO_BODY_BYTES = 220_000_000;
/** A shots CSV is at most 2 MB (MAX_CSV_BYTES); the multipart wrapping adds a little. */
export const CSV_BODY_BYTES = 3_000_000;
/** A shots API batch of up to 5000 rows (readJsonBody's cap on that route). */
export const SHOTS_API_BODY_BYTES = 2_000_000;

/**
 * The only routes that take large bodies, and only from the roles that may use them there. Every
 * other route, and every caller not signed in with one of these roles, gets SMALL_BODY_BYTES.
 */
const LARGE_BODY_ROUTES: Record<string, { roles: RoleName[]; bytes: number; bearer?: boolean }> = {
	'/jobs/[job]': { roles: TOOLROOM_WORKERS, bytes: PHOTO_BODY_BYTES },
	'/dies/[number]/surface': { roles: TOOLROOM_WORKERS, bytes: PHOTO_BODY_BYTES },
	'/shots/upload': { roles: SHOT_RECORDERS, bytes: CSV_BODY_BYTES },
	// Gateways send a bearer token; the route checks it and its scope before reading the body.
	'/api/v1/shots': { roles: SHOT_RECORDERS, bytes: SHOTS_API_BODY_BYTES, bearer: true }
};

/** Routes whose multipart posts carry photos into UPLOAD_DIR. */
export function takesPhotos(routeId: string | null): boolean {
	return !!routeId && LARGE_BODY_ROUTES[routeId]?.bytes === PHOTO_BODY_BYTES;
}

/** The most bytes this caller (a signed-in role, or a bearer token) may send to this route. */
export function bodyLimitFor(
	routeId: string | null,
	role: RoleName | null,
	hasBearer = false
): number {
	const large = routeId ? LARGE_BODY_ROUTES[routeId] : undefined;
	if (!large) return SMALL_BODY_BYTES;
	if ((role && large.roles.includes(role)) || (large.bearer && hasBearer)) return large.bytes;
	return SMALL_BODY_BYTES;
}

const megabytes = (bytes: number) => `${Math.round(bytes / 1_000_000)} MB`;

/**
 * Judges a request by its headers alone, before a byte of the body is read: a refusal sentence
 * with its status (413 too large, 411 no length where only small bodies are allowed), or null.
 */
export function refuseBodyByHeaders(
	headers: Headers,
	limit: number
): { status: 411 | 413; message: string } | null {
	const length = headers.get('content-length');
	if (length !== null) {
		const bytes = Number(length);
		if (!Number.isFinite(bytes) || bytes < 0) {
			return { status: 413, message: 'The request gives no valid length.' };
		}
		if (bytes > limit) {
			return {
				status: 413,
				message: `The request is too large: the body is larger than ${megabytes(limit)}, the most accepted here.`
			};
		}
		return null;
	}
	// A streamed body of unknown length: only where large bodies are allowed (the adapter's ceiling
	// then stops it); elsewhere ask for the length up front.
	if (headers.get('transfer-encoding') && limit <= SMALL_BODY_BYTES) {
		return { status: 411, message: 'Send the request with a Content-Length header.' };
	}
	return null;
}
