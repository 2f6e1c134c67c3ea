import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { getPhotoStore } from '$lib/server/photos';
import { findViewablePhoto } from '$lib/server/toolroom/photos';
import type { RequestHandler } from './$types';

// Photos are served only through here: plant roles see every photo, a tooling owner only those
// marked shared on its own dies. Anything else is a 404, the same as a photo that does not exist.
export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	const { id, variant } = event.params;
	if (variant !== 'full' && variant !== 'thumb') error(404, { message: 'There is no such photo.' });
	const photo = await findViewablePhoto(getDb(), id, {
		role: user.role,
		customerId: user.customerId
	});
	if (!photo) error(404, { message: 'There is no such photo.' });
	const etag = `"${photo.sha256.slice(0, 32)}-${variant}"`;
	const headers = {
		'content-type': 'image/jpeg',
		'cache-control': 'private, max-age=300',
		'x-content-type-options': 'nosniff',
		etag
	};
	if (event.request.headers.get('if-none-match') === etag) {
		return new Response(null, { status: 304, headers });
	}
	// Read from the photo store (folder or bucket) and sent from here, after the check above.
	const bytes = await getPhotoStore().get(variant === 'full' ? photo.fullFile : photo.thumbFile);
	if (!bytes) error(404, { message: 'The photo file is missing.' });
	return new Response(new Uint8Array(bytes), {
		headers: { ...headers, 'content-length': String(bytes.length) }
	});
};
