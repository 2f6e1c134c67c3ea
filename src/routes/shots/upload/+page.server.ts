import { fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import {
	commitShotCsv,
	MAX_CSV_BYTES,
	parseShotCsv,
	previewShotCsv
} from '$lib/server/shots/csv-upload';
import { SHOT_RECORDERS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...SHOT_RECORDERS);
	return {};
};

const actorOf = (user: { id: string }) => ({ userId: user.id, tokenId: null, customerId: null });

export const actions: Actions = {
	// Reads the file and shows what each row would do; writes nothing.
	preview: async (event) => {
		const user = requireRole(event, ...SHOT_RECORDERS);
		const data = await event.request.formData();
		const file = data.get('file');
		if (!(file instanceof File) || file.size === 0) {
			return fail(400, { fileError: 'Choose a CSV file to upload.' });
		}
		if (file.size > MAX_CSV_BYTES) {
			return fail(400, { fileError: 'The file is larger than 2 MB. Split it into smaller files.' });
		}
		let text: string;
		try {
			text = new TextDecoder('utf-8', { fatal: true }).decode(await file.arrayBuffer());
		} catch {
			return fail(400, {
				fileError: 'The file is not UTF-8 text. Save it as "CSV UTF-8" and try again.'
			});
		}
		const parsed = parseShotCsv(text);
		if (!parsed.ok) return fail(400, { fileError: parsed.message, fileName: file.name });
		const { preview } = await previewShotCsv(getDb(), parsed, actorOf(user));
		return { preview, csv: text, fileName: file.name };
	},
	// The file text comes back in the form; it is read and judged again before anything counts.
	commit: async (event) => {
		const user = requireRole(event, ...SHOT_RECORDERS);
		const data = await event.request.formData();
		const text = data.get('csv');
		const fileName = String(data.get('fileName') ?? 'upload.csv').slice(0, 200);
		const expected = Number(data.get('expectedValid'));
		if (typeof text !== 'string' || !text || !Number.isInteger(expected)) {
			return fail(400, { fileError: 'The preview was lost. Upload the file again.' });
		}
		const confirmReason = String(data.get('confirmReason') ?? '').slice(0, 500);
		const result = await commitShotCsv(
			getDb(),
			text,
			expected,
			actorOf(user),
			undefined,
			confirmReason
		);
		if (!result.ok) {
			return fail(409, {
				fileError: result.message,
				preview: result.preview,
				csv: result.preview ? text : undefined,
				fileName
			});
		}
		return { committed: { ...result, fileName } };
	}
};
