import type { RequestEvent } from '@sveltejs/kit';
import { BOOKING_EDITORS, SHOT_RECORDERS, type ApiScope, type RoleName } from '../../roles';
import { ApiError } from '../api/respond';
import { getDb } from '../db';
import { findActiveToken } from './tokens';

/** Who is calling an API route: a signed-in user or a bearer token. */
export interface Principal {
	userId: string | null;
	tokenId: number | null;
	role: RoleName | null;
	/** Set when the caller may only see one customer's tooling. */
	customerId: number | null;
}

const SESSION_SCOPES: Record<ApiScope, RoleName[]> = {
	'dies:read': ['admin', 'toolroom_lead', 'toolmaker', 'scheduler', 'customer'],
	'shots:write': SHOT_RECORDERS,
	'bookings:write': BOOKING_EDITORS
};

/**
 * The one check for `/api/v1` routes: a Bearer token with the scope, or a session whose role
 * carries it. 401 for no or bad credentials, 403 for a missing scope. `'any'` admits every valid
 * token and session whatever its scopes (the API description, which every client needs).
 */
export async function authorizeApi(
	event: RequestEvent,
	scope: ApiScope | 'any'
): Promise<Principal> {
	const header = event.request.headers.get('authorization');
	if (header) {
		const match = /^Bearer\s+(\S+)$/i.exec(header);
		if (!match) throw new ApiError(401, 'Use the header "Authorization: Bearer <token>".');
		const token = await findActiveToken(getDb(), match[1]);
		if (!token) throw new ApiError(401, 'The API token is unknown, revoked or expired.');
		if (scope !== 'any' && !token.scopes.includes(scope)) {
			throw new ApiError(403, `The API token lacks the scope ${scope}.`);
		}
		return { userId: null, tokenId: token.tokenId, role: null, customerId: token.customerId };
	}
	const user = event.locals.user;
	if (!user) throw new ApiError(401, 'Sign in or send an API token.');
	if (user.mustChangePassword) {
		throw new ApiError(403, 'Change the password an admin set for you first (on /account).');
	}
	if (scope !== 'any' && !SESSION_SCOPES[scope].includes(user.role)) {
		throw new ApiError(403, `Your role may not use ${scope}.`);
	}
	return {
		userId: user.id,
		tokenId: null,
		role: user.role,
		customerId: user.role === 'customer' ? user.customerId : null
	};
}
