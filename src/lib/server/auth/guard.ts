import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import { ROLE_LABELS, type RoleName } from '$lib/roles';

export type SignedInUser = NonNullable<App.Locals['user']>;

/** The pages a user who must change the password can still reach. */
const PASSWORD_CHANGE_PATHS = ['/account', '/sign-out'];

/**
 * Where sign-in sends the user back to: the page they were on. A form action's address
 * (`/dies/D-0136/surface?/inspect`) names the action, not a page, so the action goes and the
 * page's own query stays.
 */
export function returnAddress(url: URL): string {
	const query = new URLSearchParams(url.search);
	for (const key of [...query.keys()]) if (key.startsWith('/')) query.delete(key);
	const search = query.toString();
	return url.pathname + (search ? `?${search}` : '');
}

/**
 * The one role check for pages and form actions. Signed-out visitors go to sign-in (coming back
 * afterwards); a signed-in user without the role gets a 403 that names the roles allowed.
 */
export function requireRole(event: RequestEvent, ...roles: RoleName[]): SignedInUser {
	const user = event.locals.user;
	if (!user) {
		const back = returnAddress(event.url);
		const ended = event.locals.sessionEnded ? '&ended=1' : '';
		redirect(303, `/sign-in?redirectTo=${encodeURIComponent(back)}${ended}`);
	}
	// A password an admin set is a shared secret: nothing opens until the user chose their own.
	if (user.mustChangePassword && !PASSWORD_CHANGE_PATHS.includes(event.url.pathname)) {
		redirect(303, '/account?change=1');
	}
	if (roles.length > 0 && !roles.includes(user.role)) {
		error(403, {
			message: `This page needs the role ${roles.map((r) => ROLE_LABELS[r]).join(' or ')}. You are signed in as ${ROLE_LABELS[user.role]}.`
		});
	}
	return user;
}

/** Any signed-in user. */
export function requireUser(event: RequestEvent): SignedInUser {
	return requireRole(event);
}
