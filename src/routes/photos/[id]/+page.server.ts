import { error, fail } from '@sveltejs/kit';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPhotoView, setPhotoCaption } from '$lib/server/toolroom/photos';
import { DIE_EDITORS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

// The photo viewer: one photo with its caption, date, zone, half and before/after tag, and a way
// back to where it belongs. Who may see it is the same rule as for the photo file: plant roles
// every photo, a tooling owner only photos shared on its own dies (anything else is 404).
export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const photo = await loadPhotoView(getDb(), event.params.id, {
		role: user.role,
		customerId: user.customerId
	});
	if (!photo) error(404, { message: 'There is no such photo.' });
	const owner = user.role === 'customer';
	const back = owner
		? { href: `/owner/dies/${encodeURIComponent(photo.dieNumber)}#photos`, label: photo.dieNumber }
		: photo.jobNumber
			? { href: `/jobs/${encodeURIComponent(photo.jobNumber)}`, label: photo.jobNumber }
			: {
					href: `/dies/${encodeURIComponent(photo.dieNumber)}/surface`,
					label: `${photo.dieNumber} surface`
				};
	return {
		photo,
		back,
		canCaption: DIE_EDITORS.includes(user.role)
	};
};

export const actions: Actions = {
	// Gives this photo its own caption (empty removes it).
	caption: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const data = await event.request.formData();
		if (!data.has('caption'))
			return fail(400, { captionError: 'Send the caption field.', caption: '' });
		const caption = String(data.get('caption'));
		if (caption.trim().length > 200) {
			return fail(400, { captionError: 'Keep the caption under 200 characters.', caption });
		}
		const ok = await setPhotoCaption(getDb(), {
			publicId: event.params.id,
			caption,
			actorId: user.id
		});
		if (!ok) error(404, { message: 'There is no such photo.' });
		return { captionSaved: true };
	}
};
