import { getDb } from '$lib/server/db';
import { readPlantLogo } from '$lib/server/owner/statement-request';
import { plantIdentity } from '$lib/server/settings/plant-identity';
import type { RequestHandler } from './$types';

// The plant's logo (re-encoded through the photo path when uploaded), shown on the sign-in page
// before anyone signs in, so it is the one stored image every caller may read. Without a logo,
// Castellan's own mark.
const MARK = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 32 32"><rect width="32" height="32" rx="6" fill="#3b434e"/><path d="M8 24V12l4-4h8l4 4v12h-5v-6h-6v6z" fill="#e8711c"/></svg>`;

export const GET: RequestHandler = async () => {
	const logo = await readPlantLogo(await plantIdentity(getDb()));
	if (!logo) {
		return new Response(MARK, {
			headers: { 'content-type': 'image/svg+xml', 'cache-control': 'no-cache' }
		});
	}
	return new Response(new Uint8Array(logo), {
		headers: {
			'content-type': 'image/jpeg',
			'cache-control': 'no-cache',
			'x-content-type-options': 'nosniff'
		}
	});
};
