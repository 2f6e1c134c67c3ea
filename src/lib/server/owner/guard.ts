import { error, type RequestEvent } from '@sveltejs/kit';
import { requireRole, type SignedInUser } from '../auth/guard';

/**
 * The role check of every owner-portal load, action and download: a signed-in tooling owner and
 * the customer it belongs to. An owner account without a customer sees nothing (404).
 */
export function requireOwner(event: RequestEvent): { user: SignedInUser; customerId: number } {
	const user = requireRole(event, 'customer');
	if (user.customerId === null || user.customerId === undefined) {
		error(404, { message: 'Your account is not linked to a customer. Ask the plant.' });
	}
	return { user, customerId: user.customerId };
}
