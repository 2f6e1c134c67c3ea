import type { SignedInUser } from '../auth/guard';
import type { DieScope } from './register';

/** The die scope of a signed-in user: customers see only their own tooling. */
export function scopeOf(user: SignedInUser): DieScope {
	return { customerId: user.role === 'customer' ? user.customerId : null };
}
