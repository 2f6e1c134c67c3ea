import icon from '$lib/assets/favicon.svg?raw';
import type { RequestHandler } from './$types';

// Served through the app (not as a static file) so it gets the same security headers as every
// other answer. Public: the sign-in page shows it too.
export const GET: RequestHandler = () =>
	new Response(icon, {
		headers: { 'content-type': 'image/svg+xml', 'cache-control': 'public, max-age=86400' }
	});
